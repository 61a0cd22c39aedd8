// The page's side of the vehicle index. A Web Worker (src/lib/search/vehicles.worker.ts) always fetches and parses the
// list, so the page never parses it. What happens next depends on its size:
// - up to HAND_OVER vehicles, the worker hands the entries over and the page indexes them in slices between frames
//   and then searches synchronously, in the keystroke's own task. Measured in Chromium at 25,000 vehicles
//   (tests/bench/palette-browser.mjs): keystroke to results p50 4 ms this way, 9–10 ms through the worker, whose
//   answer mostly lands after the frame Chromium draws right after a keystroke; the search itself takes ~0.5 ms;
// - above it, the worker indexes and searches, and the page only sends queries and shows answers: indexing 100,000
//   takes one to a few seconds, a search up to 10–20 ms, and the index's heap brings long garbage collections.
// Each asker (the palette, intake) gets a channel that keeps at most one search in flight and drops answers to
// queries typed over.
import type { VehicleEntry } from '$lib/schemas/vehicles';
import { addRecord, createIndex, size, type SearchIndex } from '$lib/search';
import {
	vehicleHits,
	vehicleRecord,
	warmUpQueries,
	type VehicleHit,
	type VehicleReply,
	type VehicleRequest
} from '$lib/search/vehicles';

export type { VehicleHit };

export type VehicleIndexState = 'idle' | 'loading' | 'ready' | 'failed';

/** Lists up to this size are indexed and searched on the page; larger ones stay in the worker. */
export const HAND_OVER = 30_000;
/**
 * Indexing on the page runs in slices of about this long. The index's garbage collections (young-generation
 * scavenges of 4–9 ms here, as everything indexed survives) land inside slices, so they are kept short.
 */
const SLICE_MS = 3;

/** What this needs of the worker; the tests pass one that runs the service in-process. */
export interface VehicleWorker {
	postMessage(message: VehicleRequest): void;
	listen(onreply: (reply: VehicleReply) => void, onerror: () => void): void;
	terminate(): void;
}

/**
 * Starts the worker. It answers over a BroadcastChannel named for this page rather than with `postMessage`: after a
 * keystroke Chromium holds posted-message tasks (a worker's or a MessagePort's) back until the next frame is drawn,
 * so an answer ready 1 ms after the keystroke was handled 5–16 ms after it; BroadcastChannel messages are not held.
 */
export function spawnVehicleWorker(): VehicleWorker {
	const name = `lugline-vehicles-${Date.now().toString(36)}-${Math.random().toString(36).slice(2)}`;
	const worker = new Worker(new URL('../search/vehicles.worker.ts', import.meta.url), { type: 'module', name });
	const replies = new BroadcastChannel(name);
	return {
		postMessage: (message) => worker.postMessage(message),
		listen(onreply, onerror) {
			replies.onmessage = (event: MessageEvent<VehicleReply>) => onreply(event.data);
			worker.onerror = onerror;
		},
		terminate() {
			worker.terminate();
			replies.close();
		}
	};
}

export class VehicleSearch {
	state = $state<VehicleIndexState>('idle');
	/** Vehicles in the index once it is ready. */
	count = $state(0);
	#spawn: () => VehicleWorker;
	#url: string;
	#handOver: number;
	#worker: VehicleWorker | null = null;
	#ready: Promise<boolean> | null = null;
	#settle: ((ok: boolean) => void) | null = null;
	#answers = new Map<number, (hits: VehicleHit[]) => void>();
	#seq = 0;
	/** The index, when it lives on this page. */
	#local: SearchIndex | null = null;
	#handed: VehicleEntry[] = [];
	#indexed = 0;
	#lastHanded = false;
	#slicing = false;

	constructor(spawn: () => VehicleWorker = spawnVehicleWorker, url = '/api/vehicles', handOver = HAND_OVER) {
		this.#spawn = spawn;
		this.#url = url;
		this.#handOver = handOver;
	}

	/** Starts loading the index (once); resolves whether it is ready. After a failure the next call tries again. */
	load(): Promise<boolean> {
		if (this.#ready) return this.#ready;
		if (!this.#worker) {
			try {
				this.#worker = this.#spawn();
			} catch {
				this.state = 'failed';
				return Promise.resolve(false);
			}
			this.#worker.listen(
				(reply) => this.#receive(reply),
				() => {
					// The script failed to load or threw: start from a new worker next time.
					this.#stopWorker();
					this.#receive({ type: 'failed', message: 'the vehicle worker failed' });
				}
			);
		}
		this.state = 'loading';
		this.#ready = new Promise((resolve) => (this.#settle = resolve));
		this.#worker.postMessage({ type: 'load', url: this.#url, handOver: this.#handOver });
		return this.#ready;
	}

	/** Whether the index is (or becomes) ready, without starting a load. */
	whenReady(): Promise<boolean> {
		return this.state === 'loading' || this.state === 'ready' ? this.#ready! : Promise.resolve(false);
	}

	#stopWorker() {
		this.#worker?.terminate();
		this.#worker = null;
	}

	#receive(reply: VehicleReply) {
		if (reply.type === 'hits') {
			const answer = this.#answers.get(reply.seq);
			this.#answers.delete(reply.seq);
			answer?.(reply.hits);
		} else if (reply.type === 'entries') {
			for (const entry of reply.entries) this.#handed.push(entry);
			this.#lastHanded = reply.last;
			if (!reply.last) this.#worker?.postMessage({ type: 'more' });
			if (!this.#slicing) {
				this.#slicing = true;
				setTimeout(this.#indexSlice);
			}
		} else if (reply.type === 'ready') {
			this.#becomeReady(reply.count);
		} else {
			this.state = 'failed';
			this.#ready = null;
			this.#settle?.(false);
			for (const answer of this.#answers.values()) answer([]);
			this.#answers.clear();
		}
	}

	#becomeReady(count: number) {
		this.count = count;
		this.state = 'ready';
		this.#settle?.(true);
	}

	/** Indexes handed-over entries for SLICE_MS, then yields to the page until the next slice. */
	#indexSlice = () => {
		const index = (this.#local ??= createIndex());
		const until = performance.now() + SLICE_MS;
		while (this.#indexed < this.#handed.length && performance.now() < until) {
			const end = Math.min(this.#indexed + 20, this.#handed.length);
			for (; this.#indexed < end; this.#indexed++) addRecord(index, vehicleRecord(this.#handed[this.#indexed]));
		}
		if (this.#indexed < this.#handed.length) {
			setTimeout(this.#indexSlice);
			return;
		}
		this.#slicing = false;
		if (!this.#lastHanded) return;
		this.#handed = [];
		// The list is on this page now; the worker has nothing left to do.
		this.#stopWorker();
		this.#warmUp(warmUpQueries(index));
	};

	/** Searches the warm-up queries one per task, then reports the index ready. */
	#warmUp(queries: string[]) {
		const query = queries.shift();
		if (query === undefined) return this.#becomeReady(size(this.#local!));
		vehicleHits(this.#local!, query, 8);
		setTimeout(() => this.#warmUp(queries));
	}

	/** The hits at once when the index is on this page and ready; null when the worker has it (or it is not ready). */
	searchHere(query: string, limit: number): VehicleHit[] | null {
		return this.state === 'ready' && this.#local ? vehicleHits(this.#local, query, limit) : null;
	}

	/** One search; a query for the worker is posted now, so it starts before the page renders anything else. */
	search(query: string, limit: number): Promise<VehicleHit[]> {
		const here = this.searchHere(query, limit);
		if (here) return Promise.resolve(here);
		if (this.state !== 'ready' || !this.#worker) return Promise.resolve([]);
		const seq = ++this.#seq;
		const worker = this.#worker;
		return new Promise((resolve) => {
			this.#answers.set(seq, resolve);
			worker.postMessage({ type: 'search', seq, query, limit });
		});
	}

	channel(): VehicleChannel {
		return new VehicleChannel(this);
	}
}

/**
 * One asker's searches. At most one is in flight: a query typed meanwhile waits, and a newer one replaces it, so a
 * busy worker never works through a backlog of prefixes. An answer resolves `null` once a newer query was asked.
 */
export class VehicleChannel {
	#search: VehicleSearch;
	#latest = 0;
	#busy = false;
	#waiting: { run: () => void; drop: () => void } | null = null;

	constructor(search: VehicleSearch) {
		this.#search = search;
	}

	ask(query: string, limit: number): Promise<VehicleHit[] | null> {
		const ticket = ++this.#latest;
		return new Promise((resolve) => {
			const run = () => {
				this.#busy = true;
				const answer =
					this.#search.state === 'ready'
						? this.#search.search(query, limit)
						: this.#search.whenReady().then((ok) => (ok ? this.#search.search(query, limit) : []));
				void answer.then((hits) => {
					this.#busy = false;
					const next = this.#waiting;
					this.#waiting = null;
					next?.run();
					resolve(ticket === this.#latest ? hits : null);
				});
			};
			this.#waiting?.drop();
			this.#waiting = null;
			if (this.#busy) this.#waiting = { run, drop: () => resolve(null) };
			else run();
		});
	}

	/** Drops whatever is in flight or waiting (the query was cleared). */
	cancel(): void {
		this.#latest++;
		this.#waiting?.drop();
		this.#waiting = null;
	}
}

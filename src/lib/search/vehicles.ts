/**
 * The vehicle index as the palette's Web Worker runs it: fetch the compact list, parse it, then either index it and
 * answer searches, or, for a list small enough to search on the page itself, hand the entries over in chunks for the
 * page to index between frames (see vehicle-search.svelte.ts for why). Plain TypeScript with no DOM, so the worker
 * entry (vehicles.worker.ts) only wires it up and the unit tests run it in-process.
 */
import type { VehicleEntry } from '$lib/schemas/vehicles';
import { createIndex, search, size, type Range, type SearchIndex, type SearchRecord } from './index';

const digits = (s: string) => s.replace(/\D/g, '');

export function vehicleRecord(v: VehicleEntry): SearchRecord {
	return {
		id: `vehicle:${v.id}`,
		kind: 'vehicle',
		text: `${v.label} ${v.sizes.join(' ')}`,
		aliases: v.sizes.map(digits)
	};
}

/** A vehicle found: its id (as a string, like the palette's other results), what to show, what to highlight. */
export interface VehicleHit {
	id: string;
	text: string;
	ranges: Range[];
}

export type VehicleRequest =
	/** `handOver`: lists of at most this many vehicles are sent to the page instead of indexed here. */
	| { type: 'load'; url: string; handOver: number }
	/** The next chunk of a hand-over: the page asks for one at a time, so they never queue up on its thread. */
	| { type: 'more' }
	| { type: 'search'; seq: number; query: string; limit: number };

export type VehicleReply =
	| { type: 'entries'; entries: VehicleEntry[]; last: boolean }
	| { type: 'ready'; count: number; ms: number }
	| { type: 'failed'; message: string }
	/** `ms`: the search's own time in the worker, for the browser benchmark's breakdown. */
	| { type: 'hits'; seq: number; hits: VehicleHit[]; ms: number };

/** Entries per hand-over message: the page copies each message in one go (2,000 took about 7 ms), so keep it small. */
const CHUNK = 500;

function isEntry(v: unknown): v is VehicleEntry {
	const e = v as VehicleEntry;
	return (
		typeof e === 'object' &&
		e !== null &&
		typeof e.id === 'number' &&
		typeof e.label === 'string' &&
		Array.isArray(e.sizes) &&
		e.sizes.every((s) => typeof s === 'string')
	);
}

/** GET /api/vehicles' body as entries; entries of the wrong shape are skipped, not fatal. */
export function vehicleEntries(body: unknown): VehicleEntry[] {
	if (!Array.isArray(body)) throw new Error('the vehicle list is not a list');
	return body.filter(isEntry);
}

export function vehicleHits(index: SearchIndex, query: string, limit: number): VehicleHit[] {
	return search(index, query, limit).map((h) => ({
		id: h.id.slice('vehicle:'.length),
		text: index.docs[index.idToDoc.get(h.id)!]!.text,
		ranges: h.ranges
	}));
}

/**
 * Queries shaped like a writer's (prefixes growing letter by letter, a slip, a second word, digits) over one of the
 * index's own records. Searching them once before the first real keystroke lets the engine compile the search's hot
 * paths: the first keystrokes after loading took 15–30 ms on the page before it did.
 */
export function warmUpQueries(index: SearchIndex): string[] {
	const record = index.docs[index.docs.length >> 1];
	if (!record) return [];
	const words = record.text
		.toLowerCase()
		.split(/[^\p{L}\p{N}]+/u)
		.filter(Boolean);
	const name = words.find((w) => /^\p{L}{4,}$/u.test(w)) ?? 'vehicle';
	const number = words.find((w) => /^\d{3,}$/.test(w)) ?? '2014';
	const slip = name[0] + name[2] + name[1] + name.slice(3);
	return [
		...[1, 2, 3, 4, 5].map((n) => name.slice(0, n)),
		slip,
		`${slip} ${number.slice(0, 2)}`,
		`${number} ${name.slice(0, 3)}`,
		number.slice(1)
	];
}

/**
 * The worker's side of the conversation. Searches that arrive before the index is built are answered with nothing
 * (the page only asks once it has heard `ready`).
 */
export function vehicleService(post: (reply: VehicleReply) => void, fetcher: typeof fetch = fetch) {
	let index: SearchIndex | null = null;
	let loading: Promise<void> | null = null;
	let handing: VehicleEntry[] = [];
	let handed = 0;

	function handNext() {
		const entries = handing.slice(handed, handed + CHUNK);
		handed += entries.length;
		const last = handed >= handing.length;
		if (last) handing = [];
		post({ type: 'entries', entries, last });
	}

	async function load(url: string, handOver: number) {
		const started = performance.now();
		try {
			const r = await fetcher(url, { credentials: 'same-origin' });
			if (!r.ok) throw new Error(`GET ${url} answered ${r.status}`);
			const entries = vehicleEntries(await r.json());
			if (entries.length <= handOver) {
				[handing, handed] = [entries, 0];
				handNext();
				return;
			}
			index = createIndex(entries.map(vehicleRecord));
			for (const query of warmUpQueries(index)) vehicleHits(index, query, 8);
			post({ type: 'ready', count: size(index), ms: Math.round(performance.now() - started) });
		} catch (error) {
			post({ type: 'failed', message: error instanceof Error ? error.message : String(error) });
		} finally {
			loading = null;
		}
	}

	return (request: VehicleRequest): void => {
		if (request.type === 'load') {
			if (index) post({ type: 'ready', count: size(index), ms: 0 });
			else loading ??= load(request.url, request.handOver);
		} else if (request.type === 'more') {
			if (handing.length) handNext();
		} else {
			const started = performance.now();
			const hits = index ? vehicleHits(index, request.query, request.limit) : [];
			post({ type: 'hits', seq: request.seq, hits, ms: performance.now() - started });
		}
	};
}

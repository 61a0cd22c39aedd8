// The console's live floor: the snapshot from GET /api/board, kept current by the event stream, with this
// screen's own changes shown before the server has answered. The rules live in floor-model.ts; this class only
// holds the state, talks to the server and keeps the stream alive.
//
// Why the stream needs minding here: sveltekit-sse's client never reconnects by itself, numbers events per
// connection (so its ids cannot resume anything) and reports nothing when the network fails mid-stream or the
// first fetch fails. So each connection is a new source whose body carries our own cursor, every close schedules
// the next attempt, and a watchdog treats a line that has gone silent past two heartbeats as dropped.
import { source as sseSource, type Event as SseEvent, type FetchEventSourceMessage } from 'sveltekit-sse';
import { z } from 'zod';
import type { BoardSnapshot, FloorEvent, JobView, PatchWheel, WheelView } from '$lib/schemas/floor';
import {
	applyEvent,
	applyRows,
	confirm,
	countersOf,
	fromSnapshot,
	lanesOf,
	pendingWheels,
	predict,
	propose,
	rollback,
	settle,
	targetsOf,
	waitingLine,
	wheelsByJob,
	withPending,
	type Floor,
	type Pending,
	type WheelChange
} from './floor-model';

export type ConnectionState = 'connecting' | 'live' | 'reconnecting' | 'offline' | 'signed_out';

/** What went wrong, in words for the screen, with the API's code for anything that wants to branch on it. */
export interface Notice {
	code: string;
	message: string;
	issues?: { path: string; message: string }[];
}

export type Outcome = { ok: true } | ({ ok: false } & Notice);

/** Whether the device has a network, and a way to hear when that changes. */
export interface Network {
	online(): boolean;
	watch(change: () => void): () => void;
}

export interface BoardOptions {
	fetch?: typeof fetch;
	source?: typeof sseSource;
	now?: () => Date;
	random?: () => number;
	network?: Network;
	/** A snapshot the page already has (from its server load), so the first paint is the floor, not a spinner. */
	snapshot?: BoardSnapshot;
}

export const RETRY = {
	firstMs: 500,
	maxMs: 10_000,
	/** Failed attempts in a row before the strip says offline rather than reconnecting. */
	offlineAfter: 4,
	/** How long a connection may take to open; a failed first fetch is otherwise never reported. */
	openMs: 10_000,
	/** Two missed 15 s heartbeats and a little slack. */
	silentMs: 40_000
};

/** Exponential, capped, half of it random, so screens cut off together by a restart do not return in one wave. */
export function retryDelay(failures: number, random: number): number {
	const full = Math.min(RETRY.maxMs, RETRY.firstMs * 2 ** Math.max(0, failures - 1));
	return Math.round(full / 2 + (full / 2) * random);
}

const browserNetwork: Network = {
	online: () => typeof navigator === 'undefined' || navigator.onLine !== false,
	watch(change) {
		if (typeof window === 'undefined') return () => {};
		window.addEventListener('online', change);
		window.addEventListener('offline', change);
		return () => {
			window.removeEventListener('online', change);
			window.removeEventListener('offline', change);
		};
	}
};

// Only the envelope is checked: enough that folding an event in cannot throw or go backwards. The rows are the
// server's own views, typed by the shared schema module.
const versioned = z.looseObject({ id: z.number().int(), version: z.number().int() });
const floorEventSchema = z.looseObject({
	id: z.number().int().positive(),
	type: z.string(),
	at: z.string(),
	jobs: z.array(versioned),
	wheels: z.array(versioned),
	bays: z.array(z.looseObject({ id: z.number().int() }))
});
const snapshotSchema = z.looseObject({
	store: z.looseObject({ timezone: z.string() }),
	bays: z.array(z.looseObject({ id: z.number().int(), wheelIds: z.array(z.number().int()) })),
	waiting: z.array(z.looseObject({ jobId: z.number().int(), wheelIds: z.array(z.number().int()) })),
	jobs: z.array(versioned),
	wheels: z.array(versioned),
	counters: z.looseObject({ wheelsDone: z.number(), wheelsPlanned: z.number() }),
	cursor: z.number().int().min(0)
});
const problemSchema = z.looseObject({
	code: z.string(),
	message: z.string(),
	issues: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
	current: z.looseObject({ wheels: z.array(versioned) }).optional()
});

function parseJson(text: string): unknown {
	try {
		return JSON.parse(text);
	} catch {
		return undefined;
	}
}

function fallbackMessage(status: number): string {
	if (status === 401) return 'You are signed out. Sign in again to carry on.';
	if (status === 403) return 'Your role may not do this.';
	if (status === 503) return 'The server cannot reach its database. Try again in a few seconds.';
	return `The server refused this (HTTP ${status}); nothing changed.`;
}

type Timer = ReturnType<typeof setTimeout>;

export class Board {
	connection = $state<ConnectionState>('connecting');
	/** The newest event this screen applied: its type and the wheels it carried (a record saved, a photo added…). */
	lastEvent = $state<{ id: number; type: string; wheelIds: number[] } | null>(null);
	/** The last thing that went wrong, for the screen to say in words; cleared by the next action or `dismiss()`. */
	notice = $state<Notice | null>(null);

	readonly #fetch: typeof fetch;
	readonly #source: typeof sseSource;
	readonly #now: () => Date;
	readonly #random: () => number;
	readonly #network: Network;

	#confirmed = $state.raw<Floor | null>(null);
	#pending = $state.raw<readonly Pending[]>([]);

	/** The floor as this screen shows it: the server's word plus this screen's changes on their way. */
	floor = $derived(this.#confirmed && withPending(this.#confirmed, this.#pending));
	lanes = $derived(this.floor ? lanesOf(this.floor) : []);
	#byJob = $derived(this.floor ? wheelsByJob(this.floor) : new Map<number, WheelView[]>());
	waiting = $derived(this.floor ? waitingLine(this.floor, this.#byJob) : []);
	counters = $derived(this.floor ? countersOf(this.floor, this.#clock()) : null);
	/** Wheels whose change is still on its way to the server. */
	saving = $derived(pendingWheels(this.#pending));

	#wanted = false;
	/** Bumped whenever a connection is given up, so late callbacks from an old source change nothing. */
	#token = 0;
	#src: ReturnType<typeof sseSource> | null = null;
	#unsubscribe: (() => void) | null = null;
	#unwatch: (() => void) | null = null;
	#retryTimer: Timer | undefined;
	#silence: Timer | undefined;
	#failures = 0;
	#resyncs = 0;
	/** The server said our cursor cannot be resumed: the next attempt starts from a new snapshot. */
	#stale = false;
	#keys = 0;
	/** Per wheel, the request now in flight, so a second change waits and sends the version the first produced. */
	#inflight = new Map<number, Promise<Outcome>>();

	constructor(options: BoardOptions = {}) {
		this.#fetch = options.fetch ?? ((input, init) => fetch(input, init));
		this.#source = options.source ?? sseSource;
		this.#now = options.now ?? (() => new Date());
		this.#random = options.random ?? Math.random;
		this.#network = options.network ?? browserNetwork;
		if (options.snapshot) this.#confirmed = fromSnapshot(options.snapshot, this.#now());
	}

	// A method: TypeScript reads `$derived(...)` as eager and refuses a field that is only set in the constructor.
	#clock(): Date {
		return this.#now();
	}

	/** The server's word alone, without this screen's pending changes. */
	get confirmed(): Floor | null {
		return this.#confirmed;
	}

	get cursor(): number | null {
		return this.#confirmed?.cursor ?? null;
	}

	job(id: number): JobView | undefined {
		return this.floor?.jobs.get(id);
	}

	wheel(id: number): WheelView | undefined {
		return this.floor?.wheels.get(id);
	}

	wheelsOf(jobId: number): WheelView[] {
		return this.#byJob.get(jobId) ?? [];
	}

	dismiss(): void {
		this.notice = null;
	}

	// ------------------------------------------------------------------ snapshot

	/** Loads the whole floor. Used once at the start and after a `resync`; events keep it current in between. */
	async load(): Promise<boolean> {
		const result = await this.#loadSnapshot();
		// Events that came on the open stream while the snapshot was read would be missing from it; replaying
		// them from the snapshot's cursor fills that hole.
		if (result === 'behind' && this.#src) {
			this.#retire();
			void this.#attempt('reconnecting');
		}
		return result !== 'failed';
	}

	async #loadSnapshot(): Promise<'ok' | 'behind' | 'failed'> {
		let response: Response;
		let body: unknown;
		try {
			response = await this.#fetch('/api/board', { headers: { accept: 'application/json' } });
			body = parseJson(await response.text());
		} catch {
			this.notice = { code: 'unreachable', message: 'The server cannot be reached. Retrying shortly.' };
			return 'failed';
		}
		if (!response.ok) {
			this.#problem(response.status, body);
			return 'failed';
		}
		const parsed = snapshotSchema.safeParse(body);
		if (!parsed.success) {
			this.notice = { code: 'bad_snapshot', message: 'The floor could not be read from the server. Retrying shortly.' };
			return 'failed';
		}
		const floor = fromSnapshot(parsed.data as unknown as BoardSnapshot, this.#now());
		const behind = this.#confirmed !== null && floor.cursor < this.#confirmed.cursor;
		this.#stale = false;
		this.#setConfirmed(floor);
		return behind ? 'behind' : 'ok';
	}

	#setConfirmed(floor: Floor) {
		this.#confirmed = floor;
		this.#pending = settle(floor, this.#pending);
	}

	// ------------------------------------------------------------------ the stream

	connect(): void {
		if (this.#wanted) return;
		this.#wanted = true;
		this.#failures = 0;
		this.#resyncs = 0;
		this.#unwatch = this.#network.watch(() => this.#networkChanged());
		void this.#attempt('connecting');
	}

	disconnect(): void {
		this.#wanted = false;
		this.#retire();
		clearTimeout(this.#retryTimer);
		this.#unwatch?.();
		this.#unwatch = null;
		if (this.connection !== 'signed_out') this.connection = 'offline';
	}

	async #attempt(state?: ConnectionState): Promise<void> {
		clearTimeout(this.#retryTimer);
		if (!this.#wanted) return;
		if (!this.#network.online()) {
			// Nothing to try until the device has a network again; the network watch resumes.
			this.connection = 'offline';
			return;
		}
		const token = ++this.#token;
		if (state) this.connection = state;
		if (this.#stale || !this.#confirmed) {
			const loaded = await this.#loadSnapshot();
			if (token !== this.#token || !this.#wanted) return;
			if (loaded === 'failed') {
				if (this.connection !== 'signed_out') this.#retry();
				return;
			}
		}
		this.#open(token);
	}

	#open(token: number) {
		const cursor = this.#confirmed!.cursor;
		const src = this.#source('/api/events', {
			cache: false,
			options: {
				method: 'POST',
				headers: { 'content-type': 'application/json' },
				body: JSON.stringify({ cursor }),
				// Every message, pings included, in arrival order. A selected store would swallow a value equal to
				// the one before it (every ping is ''), so events are taken here instead.
				onmessage: (message) => this.#message(token, message)
			},
			open: () => {
				if (token === this.#token) this.#watch(token, RETRY.silentMs);
			},
			close: (event) => this.#closed(token, event)
		});
		this.#src = src;
		// sveltekit-sse only starts the request once something subscribes to one of its event stores.
		this.#unsubscribe = src.select('ready').subscribe(() => {});
		this.#watch(token, RETRY.openMs);
	}

	#message(token: number, message: FetchEventSourceMessage) {
		if (token !== this.#token) return;
		this.#watch(token, RETRY.silentMs);
		switch (message.event) {
			case 'floor': {
				const parsed = floorEventSchema.safeParse(parseJson(message.data));
				// Skipping a change we cannot read would leave a hole the cursor then hides; start over instead.
				if (!parsed.success) return void this.#resync();
				if (this.#confirmed) this.#setConfirmed(applyEvent(this.#confirmed, parsed.data as unknown as FloorEvent));
				this.lastEvent = { id: parsed.data.id, type: parsed.data.type, wheelIds: parsed.data.wheels.map((w) => w.id) };
				return;
			}
			case 'ready':
				this.connection = 'live';
				this.#failures = 0;
				this.#resyncs = 0;
				return;
			case 'resync':
				return void this.#resync();
			case 'signed_out':
				return this.#signedOut();
			// 'ping' only proves the line is alive, which the watchdog above has noted.
		}
	}

	#closed(token: number, event: SseEvent) {
		if (token !== this.#token) return;
		if (event.status === 401) return this.#signedOut();
		const retryAfter = event.status === 503 ? Number(event.headers?.get('retry-after')) * 1000 || 0 : 0;
		this.#retire();
		this.#retry(retryAfter);
	}

	#resync() {
		this.#retire();
		this.#stale = true;
		this.#resyncs += 1;
		// A second resync straight after a fresh snapshot means the server refuses even that cursor: wait, do not loop.
		if (this.#resyncs > 1) this.#retry();
		else void this.#attempt('reconnecting');
	}

	#watch(token: number, ms: number) {
		clearTimeout(this.#silence);
		this.#silence = setTimeout(() => {
			if (token !== this.#token) return;
			this.#retire();
			this.#retry();
		}, ms);
	}

	/** Gives up the current source; its late callbacks see a newer token and do nothing. */
	#retire() {
		this.#token += 1;
		clearTimeout(this.#silence);
		const unsubscribe = this.#unsubscribe;
		const src = this.#src;
		this.#unsubscribe = null;
		this.#src = null;
		unsubscribe?.();
		src?.close();
	}

	#retry(atLeastMs = 0) {
		clearTimeout(this.#retryTimer);
		this.#failures += 1;
		const online = this.#network.online();
		this.connection = !online || this.#failures >= RETRY.offlineAfter ? 'offline' : 'reconnecting';
		if (!online) return;
		const delay = Math.max(atLeastMs, retryDelay(this.#failures, this.#random()));
		this.#retryTimer = setTimeout(() => void this.#attempt(), delay);
	}

	#networkChanged() {
		if (!this.#wanted) return;
		if (!this.#network.online()) {
			this.#retire();
			clearTimeout(this.#retryTimer);
			this.connection = 'offline';
		} else if (!this.#src) {
			this.#failures = 0;
			void this.#attempt('reconnecting');
		}
	}

	#signedOut() {
		this.#wanted = false;
		this.#retire();
		clearTimeout(this.#retryTimer);
		this.#unwatch?.();
		this.#unwatch = null;
		this.connection = 'signed_out';
	}

	// ------------------------------------------------------------------ changes

	/** Moves wheels (a whole job, say) into a bay at a place in its queue (default: the end), or back to waiting. */
	moveWheels(wheelIds: readonly number[], bayId: number | null, queuePosition?: number): Promise<Outcome> {
		const change: WheelChange = { kind: 'move', wheelIds: [...wheelIds], bayId, queuePosition };
		return this.#change(change, '/api/wheels/move', 'POST', (version) => ({
			wheels: wheelIds.map((id) => ({ id, version: version(id) })),
			bayId,
			...(queuePosition === undefined ? {} : { queuePosition })
		}));
	}

	/** One wheel: a new place (`bayId`, `queuePosition`), back to waiting (`bayId: null`), or a new `state`. */
	patchWheel(id: number, patch: Omit<PatchWheel, 'version'>): Promise<Outcome> {
		let change: WheelChange;
		if (patch.state !== undefined) {
			if (patch.bayId !== undefined || patch.queuePosition !== undefined) {
				return Promise.resolve(this.#refuse('invalid_input', 'Move a wheel and change its state in two steps.'));
			}
			change = { kind: 'state', wheelId: id, to: patch.state, at: this.#now().toISOString() };
		} else {
			if (patch.bayId === null && patch.queuePosition !== undefined) {
				return Promise.resolve(this.#refuse('invalid_input', 'The waiting line has no queue places.'));
			}
			const bayId = patch.bayId === undefined ? (this.floor?.wheels.get(id)?.bayId ?? null) : patch.bayId;
			change = { kind: 'move', wheelIds: [id], bayId, queuePosition: patch.queuePosition };
		}
		return this.#change(change, `/api/wheels/${id}`, 'PATCH', (version) => ({ ...patch, version: version(id) }));
	}

	async #change(
		change: WheelChange,
		url: string,
		method: string,
		body: (version: (id: number) => number | undefined) => unknown
	): Promise<Outcome> {
		this.notice = null;
		const shown = this.floor;
		if (!shown) return this.#refuse('not_loaded', 'The floor is still loading.');
		const predicted = predict(shown, change);
		if (!predicted.ok) return this.#refuse('not_allowed_now', predicted.message);

		const key = ++this.#keys;
		this.#pending = propose(this.#pending, key, change);
		const ids = targetsOf(change);
		const earlier = ids.map((id) => this.#inflight.get(id)).filter((p) => p !== undefined);
		const request = (async (): Promise<Outcome> => {
			const before = await Promise.allSettled(earlier);
			if (before.some((r) => r.status === 'rejected' || !r.value.ok)) {
				// This change was made on top of one the server refused. Sending it with the version the refusal
				// brought would apply it to a floor the person never saw; the refusal's notice already says why.
				this.#pending = rollback(this.#pending, key);
				return {
					ok: false,
					code: 'superseded',
					message: 'An earlier change of this wheel was refused, so this one was not sent.'
				};
			}
			// Read after the earlier answers: they carry the versions this request must send.
			return this.#request(
				key,
				url,
				method,
				body((id) => this.floor?.wheels.get(id)?.version)
			);
		})();
		for (const id of ids) this.#inflight.set(id, request);
		try {
			return await request;
		} finally {
			for (const id of ids) if (this.#inflight.get(id) === request) this.#inflight.delete(id);
		}
	}

	async #request(key: number, url: string, method: string, body: unknown): Promise<Outcome> {
		let response: Response;
		let payload: unknown;
		try {
			response = await this.#fetch(url, {
				method,
				headers: { 'content-type': 'application/json', accept: 'application/json' },
				body: JSON.stringify(body)
			});
			payload = parseJson(await response.text());
		} catch {
			this.#pending = rollback(this.#pending, key);
			return this.#refuse('unreachable', 'The server could not be reached, so nothing changed. Try again.');
		}
		if (response.ok) {
			const rows = z.looseObject({ wheels: z.array(versioned) }).safeParse(payload);
			const answered = confirm(this.#pending, key, rows.success ? (rows.data.wheels as unknown as WheelView[]) : []);
			this.#pending = this.#confirmed ? settle(this.#confirmed, answered) : answered;
			return { ok: true };
		}
		this.#pending = rollback(this.#pending, key);
		const problem = this.#problem(response.status, payload);
		return { ok: false, ...problem };
	}

	/** Turns an error answer into a notice, taking in a 409's current rows and a lost session on the way. */
	#problem(status: number, body: unknown): Notice {
		const parsed = problemSchema.safeParse(body);
		const p = parsed.success ? parsed.data : null;
		if (status === 409 && p?.current && this.#confirmed) {
			this.#setConfirmed(applyRows(this.#confirmed, { wheels: p.current.wheels as unknown as WheelView[] }));
		}
		if (status === 401) this.#signedOut();
		const notice: Notice = {
			code: p?.code ?? `http_${status}`,
			message: p?.message ?? fallbackMessage(status),
			...(p?.issues ? { issues: p.issues } : {})
		};
		this.notice = notice;
		return notice;
	}

	#refuse(code: string, message: string): Outcome {
		this.notice = { code, message };
		return { ok: false, code, message };
	}
}

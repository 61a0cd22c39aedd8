import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import type { Event as SseEvent, Source, SourceConfiguration, source as sseSource } from 'sveltekit-sse';
import type { BoardSnapshot, WheelView } from '$lib/schemas/floor';
import { Board, RETRY, retryDelay, type Network } from './board.svelte';
import { bay, event, job, NOON, snapshotOf, wheel } from './test-fixtures';

// ------------------------------------------------------------------ fakes for the stream, the network and the API

interface Connection {
	from: string;
	config: SourceConfiguration;
	cursor: number;
	subscribed: boolean;
	closed: boolean;
	/** A server-sent event, as sveltekit-sse hands it to `options.onmessage`. */
	emit(name: string, data?: unknown): void;
	open(): void;
	/** The response ends or fails to open with this status, as sveltekit-sse reports it to `close`. */
	end(status?: number, headers?: Record<string, string>): void;
}

function sseEvent(name: string, status: number, headers: Headers, isLocal: boolean): SseEvent {
	return {
		id: '',
		event: name,
		data: '',
		isLocal,
		status,
		statusText: '',
		headers,
		connect: () => {},
		close: () => {}
	};
}

function fakeSources() {
	const connections: Connection[] = [];
	const source = ((from: string, config: SourceConfiguration = {}) => {
		const c: Connection = {
			from,
			config,
			cursor: JSON.parse(String(config.options?.body)).cursor,
			subscribed: false,
			closed: false,
			emit(name, data = '') {
				config.options?.onmessage?.({
					id: '',
					event: name,
					data: typeof data === 'string' ? data : JSON.stringify(data)
				});
			},
			open() {
				config.open?.(sseEvent('open', 200, new Headers({ 'content-type': 'text/event-stream' }), false));
			},
			end(status = 200, headers = {}) {
				config.close?.(sseEvent('close', status, new Headers(headers), false));
			}
		};
		connections.push(c);
		const src = {
			close() {
				c.closed = true;
				// Like the real client, a local close still reports through `close`.
				config.close?.(sseEvent('close', 200, new Headers(), true));
			},
			select() {
				return {
					subscribe(run: (v: string) => void) {
						c.subscribed = true;
						run('');
						return () => (c.subscribed = false);
					}
				};
			}
		};
		return src as unknown as Source;
	}) as typeof sseSource;
	return { source, connections, last: () => connections[connections.length - 1] };
}

type Handler = (init: RequestInit) => Response | Promise<Response>;

function fakeApi(routes: Record<string, Handler>) {
	const calls: { key: string; body: unknown }[] = [];
	const fetch = (async (input: RequestInfo | URL, init: RequestInit = {}) => {
		const key = `${init.method ?? 'GET'} ${String(input)}`;
		calls.push({ key, body: init.body === undefined ? undefined : JSON.parse(String(init.body)) });
		const handler = routes[key];
		if (!handler) throw new Error(`no fake for ${key}`);
		return handler(init);
	}) as typeof globalThis.fetch;
	return { fetch, calls, count: (key: string) => calls.filter((c) => c.key === key).length };
}

const json = (body: unknown, status = 200, headers: Record<string, string> = {}) =>
	new Response(JSON.stringify(body), { status, headers: { 'content-type': 'application/json', ...headers } });

function fakeNetwork() {
	let online = true;
	const watchers = new Set<() => void>();
	const network: Network = {
		online: () => online,
		watch(change) {
			watchers.add(change);
			return () => watchers.delete(change);
		}
	};
	return {
		network,
		set(value: boolean) {
			online = value;
			for (const w of watchers) w();
		}
	};
}

// ------------------------------------------------------------------ the floor these tests use

/** Bay 1: 11 (working), 12.  Bay 2: 41.  Waiting: job 3 (31, 32). */
function snapshot(cursor = 10, extra: WheelView[] = []): BoardSnapshot {
	return snapshotOf({
		bays: [bay(1), bay(2)],
		jobs: [job(1, { state: 'in_progress' }), job(3), job(4)],
		wheels: [
			wheel(11, 1, { bayId: 1, queuePosition: 1, state: 'working' }),
			wheel(12, 1, { bayId: 1, queuePosition: 2 }),
			wheel(31, 3),
			wheel(32, 3),
			wheel(41, 4, { bayId: 2, queuePosition: 1 }),
			...extra
		],
		cursor
	});
}

const placesIn = (board: Board, bayId: number) =>
	(board.lanes.find((l) => l.id === bayId)?.wheels ?? []).map((w) => `${w.id}:${w.queuePosition}`).join(' ');

/** Lets pending promises (fetch answers, awaited loads) run, moving the fake clock by `ms`. */
const tick = (ms = 0) => vi.advanceTimersByTimeAsync(ms);

function deferred<T>() {
	let resolve!: (value: T) => void;
	const promise = new Promise<T>((r) => (resolve = r));
	return { promise, resolve };
}

let sources: ReturnType<typeof fakeSources>;
let net: ReturnType<typeof fakeNetwork>;

beforeEach(() => {
	vi.useFakeTimers();
	sources = fakeSources();
	net = fakeNetwork();
});
afterEach(() => {
	vi.useRealTimers();
});

function makeBoard(routes: Record<string, Handler> = {}) {
	const api = fakeApi({ 'GET /api/board': () => json(snapshot()), ...routes });
	// random() = 1: the full backoff, so the waits below are exact.
	const board = new Board({
		fetch: api.fetch,
		source: sources.source,
		now: () => NOON,
		random: () => 1,
		network: net.network
	});
	return { board, api };
}

async function live(routes: Record<string, Handler> = {}) {
	const made = makeBoard(routes);
	made.board.connect();
	await tick();
	sources.last().open();
	sources.last().emit('ready', { cursor: 10 });
	return made;
}

// ------------------------------------------------------------------ tests

describe('retryDelay', () => {
	it('doubles from half a second to a cap of ten, half of it random', () => {
		expect([1, 2, 3, 4, 5, 6, 9].map((n) => retryDelay(n, 1))).toEqual([500, 1000, 2000, 4000, 8000, 10_000, 10_000]);
		expect(retryDelay(3, 0)).toBe(1000);
	});
});

describe('connecting', () => {
	it('loads the snapshot once, then streams from its cursor with a POST and a JSON body', async () => {
		const { board, api } = makeBoard();
		expect(board.connection).toBe('connecting');
		board.connect();
		await tick();
		expect(api.count('GET /api/board')).toBe(1);
		expect(sources.connections).toHaveLength(1);
		const c = sources.last();
		expect(c.from).toBe('/api/events');
		expect(c.config.cache).toBe(false);
		expect(c.config.options).toMatchObject({
			method: 'POST',
			headers: { 'content-type': 'application/json' },
			body: '{"cursor":10}'
		});
		expect(c.subscribed).toBe(true);
		expect(board.connection).toBe('connecting');
		c.emit('ready', { cursor: 10 });
		expect(board.connection).toBe('live');
	});

	it('starts from a snapshot the page already has, without fetching it again', async () => {
		const api = fakeApi({});
		const board = new Board({
			fetch: api.fetch,
			source: sources.source,
			network: net.network,
			snapshot: snapshot(33),
			now: () => NOON
		});
		expect(placesIn(board, 1)).toBe('11:1 12:2');
		board.connect();
		await tick();
		expect(api.calls).toEqual([]);
		expect(sources.last().cursor).toBe(33);
	});

	it('applies stream events in place, ignores a duplicate, and never reloads the board for them', async () => {
		const { board, api } = await live();
		sources.last().emit('floor', event(11, { wheels: [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 })] }));
		sources.last().emit('floor', event(11, { wheels: [wheel(31, 3, { bayId: null, version: 9 })] }));
		expect(placesIn(board, 2)).toBe('41:1 31:2');
		expect(board.cursor).toBe(11);
		expect(board.waiting.map((j) => j.id)).toEqual([3]);
		expect(api.count('GET /api/board')).toBe(1);
	});

	it('after the stream ends, reconnects with backoff from the last applied event, without reloading', async () => {
		const { board, api } = await live();
		const first = sources.last();
		first.emit('floor', event(11, { wheels: [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 })] }));
		first.emit('floor', event(14, { wheels: [wheel(32, 3, { bayId: 2, queuePosition: 3, version: 2 })] }));
		first.end();
		expect(board.connection).toBe('reconnecting');
		expect(first.subscribed).toBe(false);
		await tick(retryDelay(1, 1) - 1);
		expect(sources.connections).toHaveLength(1);
		await tick(1);
		expect(sources.connections).toHaveLength(2);
		expect(sources.last().cursor).toBe(14);
		expect(api.count('GET /api/board')).toBe(1);
		sources.last().emit('ready', { cursor: 14 });
		expect(board.connection).toBe('live');
	});

	it('backs off further on each failure, says offline after several, and starts over once live', async () => {
		const { board } = await live();
		const waits: number[] = [];
		for (let failure = 1; failure <= RETRY.offlineAfter; failure++) {
			sources.last().end(502);
			expect(board.connection).toBe(failure < RETRY.offlineAfter ? 'reconnecting' : 'offline');
			const before = sources.connections.length;
			let waited = 0;
			while (sources.connections.length === before) {
				await tick(250);
				waited += 250;
			}
			waits.push(waited);
		}
		expect(waits).toEqual([500, 1000, 2000, 4000]);
		// Still offline while the next attempt opens; live again once the server says so.
		expect(board.connection).toBe('offline');
		sources.last().emit('ready', { cursor: 10 });
		expect(board.connection).toBe('live');
		sources.last().end();
		await tick(retryDelay(1, 1));
		expect(sources.connections).toHaveLength(RETRY.offlineAfter + 2);
	});

	it('waits at least as long as a 503 asks', async () => {
		await live();
		sources.last().end(503, { 'retry-after': '5' });
		await tick(4999);
		expect(sources.connections).toHaveLength(1);
		await tick(1);
		expect(sources.connections).toHaveLength(2);
	});

	it('treats a line silent past two heartbeats as dropped, and pings as signs of life', async () => {
		await live();
		for (let i = 0; i < 8; i++) {
			await tick(15_000);
			sources.last().emit('ping');
		}
		expect(sources.connections).toHaveLength(1);
		await tick(RETRY.silentMs);
		expect(sources.connections[0].closed).toBe(true);
		await tick(retryDelay(1, 1));
		expect(sources.connections).toHaveLength(2);
	});

	it('gives up on a connection that never opens (the client library reports no failed fetch)', async () => {
		const { board } = makeBoard();
		board.connect();
		await tick(RETRY.openMs);
		expect(sources.connections[0].closed).toBe(true);
		expect(board.connection).toBe('reconnecting');
	});
});

describe('resync', () => {
	it('reloads the snapshot exactly once and reconnects from its cursor', async () => {
		let cursor = 10;
		const { board, api } = await live({ 'GET /api/board': () => json(snapshot(cursor)) });
		const first = sources.last();
		cursor = 50;
		first.emit('resync', { reason: 'too_old' });
		first.end(); // the server closes right after
		await tick();
		expect(api.count('GET /api/board')).toBe(2);
		expect(sources.connections).toHaveLength(2);
		expect(sources.last().cursor).toBe(50);
		expect(board.cursor).toBe(50);
		expect(board.connection).toBe('reconnecting');
		// Long enough for any backoff to have fired, shorter than the watchdog's patience with an unopened line.
		await tick(RETRY.openMs - 1);
		expect(api.count('GET /api/board')).toBe(2);
		// The old stream's close, which came after the resync, started nothing.
		expect(sources.connections).toHaveLength(2);
		expect(sources.connections[1].closed).toBe(false);
	});

	it('backs off when the fresh snapshot’s cursor is refused again, rather than looping', async () => {
		const { api } = await live();
		sources.last().emit('resync', { reason: 'too_old' });
		await tick();
		sources.last().emit('resync', { reason: 'too_old' });
		await tick();
		expect(api.count('GET /api/board')).toBe(2);
		await tick(retryDelay(1, 1));
		expect(api.count('GET /api/board')).toBe(3);
	});

	it('starts over from a snapshot when an event cannot be read, rather than skipping it', async () => {
		const { api } = await live();
		sources.last().emit('floor', '{"id": 11, "wheels": "oops"}');
		await tick();
		expect(api.count('GET /api/board')).toBe(2);
	});
});

describe('ending', () => {
	it('stops for good when the server says the session ended', async () => {
		const { board, api } = await live();
		sources.last().emit('signed_out', {});
		sources.last().end();
		await tick(120_000);
		expect(board.connection).toBe('signed_out');
		expect(sources.connections).toHaveLength(1);
		expect(api.count('GET /api/board')).toBe(1);
	});

	it('treats a 401 on connect as signed out', async () => {
		const { board } = makeBoard();
		board.connect();
		await tick();
		sources.last().end(401);
		await tick(120_000);
		expect(board.connection).toBe('signed_out');
		expect(sources.connections).toHaveLength(1);
	});

	it('says offline while the device has no network and comes back at once when it returns', async () => {
		const { board } = await live();
		sources.last().emit('floor', event(12, { wheels: [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 })] }));
		net.set(false);
		expect(board.connection).toBe('offline');
		expect(sources.last().closed).toBe(true);
		await tick(120_000);
		expect(sources.connections).toHaveLength(1);
		net.set(true);
		await tick();
		expect(sources.connections).toHaveLength(2);
		expect(sources.last().cursor).toBe(12);
		expect(board.connection).toBe('reconnecting');
	});

	it('disconnect closes the stream and does not come back', async () => {
		const { board } = await live();
		board.disconnect();
		sources.connections[0].end();
		await tick(120_000);
		expect(sources.connections).toHaveLength(1);
		expect(sources.connections[0].closed).toBe(true);
		expect(board.connection).toBe('offline');
	});
});

describe('changes', () => {
	it('shows a move at once; a 409 rolls it back, takes the current rows and says why', async () => {
		const answer = deferred<Response>();
		const { board, api } = await live({ 'POST /api/wheels/move': () => answer.promise });
		const outcome = board.moveWheels([31], 2);
		expect(placesIn(board, 2)).toBe('41:1 31:2');
		expect(board.saving.has(31)).toBe(true);
		await tick();
		expect(api.calls.at(-1)).toEqual({
			key: 'POST /api/wheels/move',
			body: { wheels: [{ id: 31, version: 1 }], bayId: 2 }
		});

		const message =
			'Someone else changed this a moment ago. The screen now shows the current state; check it and try again.';
		answer.resolve(
			json(
				{
					code: 'version_conflict',
					message,
					current: { wheels: [wheel(31, 3, { bayId: null, version: 3, position: 'LR' })] }
				},
				409
			)
		);
		expect(await outcome).toEqual({ ok: false, code: 'version_conflict', message });
		expect(board.notice?.message).toBe(message);
		expect(placesIn(board, 2)).toBe('41:1');
		expect(board.floor?.wheels.get(31)).toMatchObject({ version: 3, position: 'LR', bayId: null });
		expect(board.saving.size).toBe(0);
	});

	it('keeps an accepted move, sends its new version next time, and settles when the stream brings it', async () => {
		const moved = [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 })];
		const { board, api } = await live({
			'POST /api/wheels/move': () => json({ wheels: moved }),
			'PATCH /api/wheels/31': () =>
				json({
					wheels: [
						wheel(31, 3, { bayId: 2, queuePosition: 1, version: 3 }),
						wheel(41, 4, { bayId: 2, queuePosition: 2 })
					]
				})
		});
		expect(await board.moveWheels([31], 2)).toEqual({ ok: true });
		expect(board.floor?.wheels.get(31)).toMatchObject({ bayId: 2, version: 2 });
		expect(board.confirmed?.wheels.get(31)?.version).toBe(1); // the stream has not said so yet

		expect(await board.patchWheel(31, { queuePosition: 1 })).toEqual({ ok: true });
		expect(api.calls.at(-1)).toEqual({ key: 'PATCH /api/wheels/31', body: { queuePosition: 1, version: 2 } });
		expect(placesIn(board, 2)).toBe('31:1 41:2');

		sources.last().emit('floor', event(11, { wheels: moved }));
		sources.last().emit(
			'floor',
			event(12, {
				wheels: [wheel(31, 3, { bayId: 2, queuePosition: 1, version: 3 }), wheel(41, 4, { bayId: 2, queuePosition: 2 })]
			})
		);
		expect(board.floor).toBe(board.confirmed);
	});

	it('holds a second change of the same wheel until the first is answered', async () => {
		const first = deferred<Response>();
		let moves = 0;
		const { board, api } = await live({
			'POST /api/wheels/move': () =>
				++moves === 1 ? first.promise : json({ wheels: [wheel(31, 3, { bayId: 1, queuePosition: 2, version: 3 })] })
		});
		const a = board.moveWheels([31], 2);
		const b = board.moveWheels([31], 1);
		await tick();
		expect(api.count('POST /api/wheels/move')).toBe(1);
		// Both show at once, the second on top of the first.
		expect(placesIn(board, 1)).toBe('11:1 12:2 31:3');
		expect(placesIn(board, 2)).toBe('41:1');
		first.resolve(json({ wheels: [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 })] }));
		expect(await a).toEqual({ ok: true });
		expect(await b).toEqual({ ok: true });
		expect(api.calls.at(-1)?.body).toEqual({ wheels: [{ id: 31, version: 2 }], bayId: 1 });
	});

	it('does not send a change made on top of one the server refused', async () => {
		const message = 'Someone else changed this a moment ago.';
		const { board, api } = await live({
			'POST /api/wheels/move': () =>
				json(
					{
						code: 'version_conflict',
						message,
						current: { wheels: [wheel(31, 3, { bayId: 1, queuePosition: 3, version: 4 })] }
					},
					409
				)
		});
		const a = board.moveWheels([31], 2);
		const b = board.patchWheel(31, { queuePosition: 1 });
		expect(await a).toMatchObject({ ok: false, code: 'version_conflict' });
		expect(await b).toMatchObject({ ok: false, code: 'superseded' });
		expect(api.count('POST /api/wheels/move')).toBe(1);
		expect(api.count('PATCH /api/wheels/31')).toBe(0);
		expect(board.notice?.message).toBe(message);
		expect(board.floor).toBe(board.confirmed);
	});

	it('rolls back and says so when the server cannot be reached', async () => {
		const { board } = await live({
			'POST /api/wheels/move': () => {
				throw new TypeError('Failed to fetch');
			}
		});
		const outcome = await board.moveWheels([31, 32], 1);
		expect(outcome).toMatchObject({ ok: false, code: 'unreachable' });
		expect(placesIn(board, 1)).toBe('11:1 12:2');
		expect(board.waiting.map((j) => j.id)).toEqual([3]);
	});

	it('rolls back on a refusal other than a conflict, with the server’s words', async () => {
		const message = 'Bay B2 is out of service.';
		const { board } = await live({ 'POST /api/wheels/move': () => json({ code: 'not_allowed_now', message }, 422) });
		expect(await board.moveWheels([31], 2)).toEqual({ ok: false, code: 'not_allowed_now', message });
		expect(placesIn(board, 2)).toBe('41:1');
		expect(board.notice).toEqual({ code: 'not_allowed_now', message });
	});

	it('does not send what the floor already shows to be impossible', async () => {
		const { board, api } = await live();
		const outcome = await board.moveWheels([11], 2);
		expect(outcome).toEqual({
			ok: false,
			code: 'not_allowed_now',
			message: 'Wheel RF of job 1001 is being worked on: only queued wheels move.'
		});
		expect(api.count('POST /api/wheels/move')).toBe(0);
	});

	it('starts a wheel with a PATCH carrying only the new state and the version shown', async () => {
		const { board, api } = await live({
			'PATCH /api/wheels/12': () =>
				json({ wheels: [wheel(12, 1, { bayId: 1, queuePosition: 2, state: 'working', version: 2 })] })
		});
		expect(await board.patchWheel(12, { state: 'working' })).toEqual({ ok: true });
		expect(api.calls.at(-1)).toEqual({ key: 'PATCH /api/wheels/12', body: { state: 'working', version: 1 } });
		expect(board.floor?.wheels.get(12)).toMatchObject({ state: 'working', version: 2 });
	});

	it('a 401 on a change signs the screen out', async () => {
		const { board } = await live({
			'POST /api/wheels/move': () => json({ code: 'signed_out', message: 'Sign in first.' }, 401)
		});
		await board.moveWheels([31], 2);
		expect(board.connection).toBe('signed_out');
		expect(sources.last().closed).toBe(true);
	});
});

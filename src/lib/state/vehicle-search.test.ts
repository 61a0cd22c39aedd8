import { describe, expect, it } from 'vitest';
import type { VehicleEntry } from '$lib/schemas/vehicles';
import { inventedVehicles } from '$lib/search/fixture';
import { vehicleService, type VehicleReply, type VehicleRequest } from '$lib/search/vehicles';
import { VehicleSearch, type VehicleWorker } from './vehicle-search.svelte';

/**
 * The worker's service run in-process, with each message copied and delivered a timer tick later, as between threads.
 * `posted` records what the page sent.
 */
function inProcessWorker(respond: () => Response | Promise<Response>) {
	const posted: VehicleRequest[] = [];
	let terminated = false;
	let onreply: ((reply: VehicleReply) => void) | null = null;
	const later = (fn: () => void) => setTimeout(() => !terminated && fn());
	const handle = vehicleService(
		(reply) => later(() => onreply?.(structuredClone(reply))),
		async () => respond()
	);
	const worker: VehicleWorker = {
		postMessage(message) {
			posted.push(message);
			later(() => handle(structuredClone(message)));
		},
		listen(reply) {
			onreply = reply;
		},
		terminate() {
			terminated = true;
		}
	};
	return { worker, posted, terminated: () => terminated };
}

const vehicles = inventedVehicles(3000);
const json = (body: unknown, status = 200) => new Response(JSON.stringify(body), { status });

describe('a list larger than the hand-over size: indexed and searched in the worker', () => {
	it('answers only the latest of several queries typed while one was in flight', async () => {
		const w = inProcessWorker(() => json(vehicles));
		const search = new VehicleSearch(() => w.worker, '/api/vehicles', 100);
		expect(await search.load()).toBe(true);
		expect(search.state).toBe('ready');
		expect(search.count).toBe(3000);
		expect(search.searchHere('lira', 5)).toBeNull();

		const channel = search.channel();
		const answers = await Promise.all(['l', 'li', 'lir', 'lira 2014'].map((q) => channel.ask(q, 5)));
		expect(answers.slice(0, 3)).toEqual([null, null, null]);
		expect(answers[3]?.[0]).toMatchObject({ id: '1', text: '2014–2019 Corvane Lira LX 215/55R17' });
		// One query in flight at a time: the first went at once, the ones typed over it never reached the worker.
		expect(w.posted.filter((m) => m.type === 'search').map((m) => m.type === 'search' && m.query)).toEqual([
			'l',
			'lira 2014'
		]);
	});

	it('drops an answer once the query is cleared, and keeps channels apart', async () => {
		const w = inProcessWorker(() => json(vehicles));
		const search = new VehicleSearch(() => w.worker, '/api/vehicles', 100);
		await search.load();
		const palette = search.channel();
		const intake = search.channel();
		const dropped = palette.ask('lira', 5);
		const kept = intake.ask('brisk', 5);
		palette.cancel();
		expect(await dropped).toBeNull();
		expect((await kept)?.[0]?.text).toContain('Tessaro Brisk');
	});

	it('waits for the index when asked while it loads', async () => {
		const w = inProcessWorker(() => json(vehicles));
		const search = new VehicleSearch(() => w.worker, '/api/vehicles', 100);
		const loading = search.load();
		expect(search.state).toBe('loading');
		const hits = await search.channel().ask('dravane', 3);
		expect(hits?.[0]?.text).toContain('Oskelu Dravane');
		expect(await loading).toBe(true);
	});
});

describe('a list up to the hand-over size: indexed on the page between frames, searched at once', () => {
	it('indexes the handed-over entries, stops the worker and searches synchronously', async () => {
		const w = inProcessWorker(() => json(vehicles));
		const search = new VehicleSearch(() => w.worker, '/api/vehicles', 5000);
		expect(await search.load()).toBe(true);
		expect(search.count).toBe(3000);
		expect(w.terminated()).toBe(true);
		expect(search.searchHere('corvnae lira 2014', 3)?.[0]?.id).toBe('1');
		expect(await search.channel().ask('ldoun 2015', 3)).toEqual(search.searchHere('ldoun 2015', 3));
		expect(w.posted.filter((m) => m.type === 'search')).toEqual([]);
	});

	it('skips entries of the wrong shape and takes an empty list', async () => {
		const odd = [{ id: 'x', label: 3 }, null, { id: 7, label: '2001–2004 Invented Thing', sizes: ['195/65R15'] }];
		const search = new VehicleSearch(() => inProcessWorker(() => json(odd)).worker, '/api/vehicles', 5000);
		expect(await search.load()).toBe(true);
		expect(search.count).toBe(1);
		expect(search.searchHere('1956515', 3)?.map((h) => h.id)).toEqual(['7']);

		const empty = new VehicleSearch(() => inProcessWorker(() => json([] as VehicleEntry[])).worker, '/x', 5000);
		expect(await empty.load()).toBe(true);
		expect(empty.searchHere('anything', 3)).toEqual([]);
	});
});

describe('failures', () => {
	it('reports a failed load, answers with nothing, and tries again on the next load', async () => {
		let status = 503;
		const w = inProcessWorker(() => json(status === 200 ? vehicles : { code: 'unavailable' }, status));
		const search = new VehicleSearch(() => w.worker, '/api/vehicles', 100);
		expect(await search.load()).toBe(false);
		expect(search.state).toBe('failed');
		expect(await search.channel().ask('lira', 3)).toEqual([]);
		status = 200;
		expect(await search.load()).toBe(true);
		expect(search.state).toBe('ready');
	});

	it('fails without a worker (no Worker in this environment)', async () => {
		const search = new VehicleSearch(() => {
			throw new ReferenceError('Worker is not defined');
		});
		expect(await search.load()).toBe(false);
		expect(search.state).toBe('failed');
	});
});

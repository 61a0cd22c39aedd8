// The floor API as each role uses it, through the built app: who may do what (DESIGN.md §2), all-or-none moves,
// stale versions, another store's rows, and bad input answered with a 4xx a person can act on.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../support/database';
import { client, signIn, startInstances, stopInstances, type Client, type Instance } from '../support/instances';
import { createTestStore, newJob, type TestStore } from '../support/store';

let instances: Instance[];
let store: TestStore;
const as: Record<string, Client> = {};

beforeAll(async () => {
	store = await createTestStore(`api-${process.pid}`);
	instances = await startInstances([3203]);
	const url = instances[0].url;
	for (const key of ['lead', 'writer', 'tech', 'tech2', 'manager'] as const) {
		as[key] = client(url, await signIn(url, store.people[key].email, store.people[key].password));
	}
}, 60_000);

afterAll(async () => {
	await stopInstances(instances ?? []);
});

async function job(overrides = {}) {
	const r = await as.writer.call('POST', '/api/jobs', newJob(overrides));
	expect(r.status, JSON.stringify(r.body)).toBe(201);
	return r.body;
}

describe('who may do what on the floor', () => {
	it('a writer creates and cancels jobs but cannot move wheels; a technician cannot create jobs', async () => {
		const j = await job();
		expect(j.number).toBeGreaterThan(0);
		expect(j.wheels.map((w: { position: string }) => w.position)).toEqual(['LF', 'RF', 'LR', 'RR']);
		const move = await as.writer.call('PATCH', `/api/wheels/${j.wheels[0].id}`, {
			version: 1,
			bayId: store.bays[0].id
		});
		expect(move.status).toBe(403);
		expect((await as.tech.call('POST', '/api/jobs', newJob())).status).toBe(403);
		const cancel = await as.writer.call('PATCH', `/api/jobs/${j.id}`, { version: j.version, state: 'cancelled' });
		expect(cancel.status).toBe(200);
		expect(cancel.body.state).toBe('cancelled');
	});

	it('a technician starts and finishes wheels in their own bay, not in another technician’s', async () => {
		const j = await job({ wheels: ['LF', 'RF'] });
		const moved = await as.lead.call('POST', '/api/wheels/move', {
			wheels: j.wheels.map((w: { id: number; version: number }) => ({ id: w.id, version: w.version })),
			bayId: store.bays[0].id
		});
		expect(moved.status).toBe(200);
		const [lf, rf] = j.wheels.map((w: { id: number }) => moved.body.wheels.find((m: { id: number }) => m.id === w.id));
		const refused = await as.tech2.call('PATCH', `/api/wheels/${lf.id}`, { version: lf.version, state: 'working' });
		expect(refused.status).toBe(403);
		expect(refused.body.message).toContain('another technician');
		let r = await as.tech.call('PATCH', `/api/wheels/${lf.id}`, { version: lf.version, state: 'working' });
		expect(r.status).toBe(200);
		const working = r.body.wheels.find((w: { id: number }) => w.id === lf.id);
		expect(working).toMatchObject({ state: 'working', techId: store.people.tech.id, queuePosition: 1 });
		r = await as.tech.call('PATCH', `/api/wheels/${lf.id}`, { version: working.version, state: 'done' });
		expect(r.status).toBe(200);
		r = await as.tech.call('PATCH', `/api/wheels/${rf.id}`, { version: rf.version, state: 'working' });
		const rfWorking = r.body.wheels.find((w: { id: number }) => w.id === rf.id);
		r = await as.tech.call('PATCH', `/api/wheels/${rf.id}`, { version: rfWorking.version, state: 'done' });
		expect(r.status).toBe(200);
		const done = await as.writer.call('GET', `/api/jobs/${j.id}`);
		expect(done.body.state).toBe('done');
		expect(done.body.doneAt).not.toBeNull();
		// Only a lead reopens finished work.
		const lfDone = done.body.wheels.find((w: { id: number }) => w.id === lf.id);
		expect(
			(await as.tech.call('PATCH', `/api/wheels/${lf.id}`, { version: lfDone.version, state: 'queued' })).status
		).toBe(403);
		r = await as.lead.call('PATCH', `/api/wheels/${lf.id}`, { version: lfDone.version, state: 'queued' });
		expect(r.status).toBe(200);
		expect((await as.writer.call('GET', `/api/jobs/${j.id}`)).body.state).toBe('in_progress');
	});

	it('an unclaimed bay takes any technician', async () => {
		const j = await job({ wheels: ['SP'] });
		const w = j.wheels[0];
		const moved = await as.lead.call('PATCH', `/api/wheels/${w.id}`, { version: w.version, bayId: store.bays[1].id });
		const r = await as.tech2.call('PATCH', `/api/wheels/${w.id}`, {
			version: moved.body.wheels.find((x: { id: number }) => x.id === w.id).version,
			state: 'working'
		});
		expect(r.status).toBe(200);
	});
});

describe('conflicts and refusals', () => {
	it('a move of several wheels with one stale version moves none of them', async () => {
		const j = await job();
		const body = {
			wheels: j.wheels.map((w: { id: number; version: number }, i: number) => ({
				id: w.id,
				version: i === 2 ? w.version + 5 : w.version
			})),
			bayId: store.bays[2].id
		};
		const r = await as.lead.call('POST', '/api/wheels/move', body);
		expect(r.status).toBe(409);
		expect(r.body.current.wheels).toHaveLength(4);
		const rows = await withClient((c) => c.query('SELECT bay_id FROM wheels WHERE job_id = $1', [j.id]));
		expect(rows.rows.every((x) => x.bay_id === null)).toBe(true);
	});

	it('a whole job moved to the head of a bay queue keeps the places gap-free', async () => {
		const first = await job({ wheels: ['LF', 'RF'] });
		const second = await job({ wheels: ['LF', 'RF', 'LR'] });
		const bay = store.bays[3].id;
		const ids = (j: { wheels: { id: number; version: number }[] }) =>
			j.wheels.map((w) => ({ id: w.id, version: w.version }));
		expect((await as.lead.call('POST', '/api/wheels/move', { wheels: ids(first), bayId: bay })).status).toBe(200);
		const r = await as.lead.call('POST', '/api/wheels/move', { wheels: ids(second), bayId: bay, queuePosition: 1 });
		expect(r.status).toBe(200);
		const lane = await withClient((c) =>
			c.query(`SELECT id, queue_position FROM wheels WHERE bay_id = $1 AND state <> 'done' ORDER BY queue_position`, [
				bay
			])
		);
		expect(lane.rows.map((x) => x.queue_position)).toEqual([1, 2, 3, 4, 5]);
		expect(lane.rows.slice(0, 3).map((x) => x.id)).toEqual(second.wheels.map((w: { id: number }) => w.id));
	});

	it('a stale job version gets 409 with the current job; a started job cannot be cancelled', async () => {
		const j = await job();
		const edited = await as.writer.call('PATCH', `/api/jobs/${j.id}`, {
			version: j.version,
			notes: 'Customer waits in the lounge'
		});
		expect(edited.status).toBe(200);
		const stale = await as.lead.call('PATCH', `/api/jobs/${j.id}`, { version: j.version, priority: 3 });
		expect(stale.status).toBe(409);
		expect(stale.body.current.notes).toBe('Customer waits in the lounge');
		const w = j.wheels[0];
		const moved = await as.lead.call('PATCH', `/api/wheels/${w.id}`, { version: w.version, bayId: store.bays[0].id });
		const v = moved.body.wheels.find((x: { id: number }) => x.id === w.id).version;
		expect((await as.tech.call('PATCH', `/api/wheels/${w.id}`, { version: v, state: 'working' })).status).toBe(200);
		const current = await as.writer.call('GET', `/api/jobs/${j.id}`);
		const cancel = await as.writer.call('PATCH', `/api/jobs/${j.id}`, {
			version: current.body.version,
			state: 'cancelled'
		});
		expect(cancel.status).toBe(422);
		expect(cancel.body.message).toMatch(/only a job whose work has not started/);
	});

	it('another store’s jobs and wheels are not found, and stay unchanged', async () => {
		const other = await withClient((c) =>
			c.query(`SELECT j.id AS job, w.id AS wheel, w.version, w.bay_id FROM jobs j JOIN wheels w ON w.job_id = j.id
			          JOIN stores s ON s.id = j.store_id WHERE s.slug = 'demo' AND w.state = 'queued' LIMIT 1`)
		);
		const { job: jobId, wheel, version, bay_id } = other.rows[0];
		expect((await as.manager.call('GET', `/api/jobs/${jobId}`)).status).toBe(404);
		expect((await as.lead.call('PATCH', `/api/wheels/${wheel}`, { version, bayId: null })).status).toBe(404);
		const after = await withClient((c) => c.query('SELECT version, bay_id FROM wheels WHERE id = $1', [wheel]));
		expect(after.rows[0]).toEqual({ version, bay_id });
	});

	it('bad input gets a 4xx with a message, never a 5xx', async () => {
		const j = await job();
		const w = j.wheels[0];
		const cases: [unknown, number][] = [
			[{ version: w.version, state: 'flying' }, 400],
			[{ version: 'one', bayId: store.bays[0].id }, 400],
			[{ version: w.version }, 400],
			[{ version: w.version, bayId: 999999 }, 404],
			[{ version: w.version, bayId: null, queuePosition: 2 }, 400],
			[{ version: w.version, state: 'done' }, 422]
		];
		for (const [body, status] of cases) {
			const r = await as.lead.call('PATCH', `/api/wheels/${w.id}`, body);
			expect(r.status, JSON.stringify(body)).toBe(status);
			expect(typeof r.body.message).toBe('string');
			expect(r.body.code).toBeTruthy();
		}
		const invalid = await as.lead.call('PATCH', `/api/wheels/${w.id}`, { version: w.version, state: 'flying' });
		expect(invalid.body.issues[0].path).toBe('state');
		const plain = await fetch(`${instances[0].url}/api/jobs`, {
			method: 'POST',
			headers: { origin: instances[0].url, cookie: '', 'content-type': 'text/plain' },
			body: '{}'
		});
		expect([401, 403, 415]).toContain(plain.status);
		const text = await as.lead.call('POST', '/api/wheels/move', undefined);
		expect(text.status).toBe(415);
		const outOfService = await withClient((c) =>
			c.query('UPDATE bays SET active = false WHERE id = $1 RETURNING code', [store.bays[2].id])
		);
		try {
			const r = await as.lead.call('PATCH', `/api/wheels/${w.id}`, { version: w.version, bayId: store.bays[2].id });
			expect(r.status).toBe(422);
			expect(r.body.message).toContain(`${outOfService.rows[0].code} is out of service`);
		} finally {
			await withClient((c) => c.query('UPDATE bays SET active = true WHERE id = $1', [store.bays[2].id]));
		}
		expect((await as.lead.call('PATCH', '/api/wheels/0', { version: 1, bayId: null })).status).toBe(404);
		expect((await as.writer.call('POST', '/api/jobs', newJob({ customerId: 1 }))).status).toBe(400);
		expect((await as.writer.call('POST', '/api/jobs', newJob({ services: ['no-such-service'] }))).status).toBe(422);
	});

	it('the board snapshot holds every floor job and wheel once, lanes in queue order, the waiting line by promise', async () => {
		const later = await job({ promisedAt: new Date(Date.now() + 7_200_000).toISOString(), wheels: ['LF'] });
		const sooner = await job({ promisedAt: new Date(Date.now() + 1_800_000).toISOString(), wheels: ['RF', 'LR'] });
		const r = await as.tech.call('GET', '/api/board');
		expect(r.status).toBe(200);
		const snap = r.body;
		expect(snap.store.id).toBe(store.id);
		const floorJobs = await withClient(async (c) =>
			(
				await c.query(
					`SELECT id FROM jobs WHERE store_id = $1 AND state IN ('waiting', 'in_progress', 'done') ORDER BY promised_at, id`,
					[store.id]
				)
			).rows.map((x) => x.id)
		);
		expect(snap.jobs.map((j: { id: number }) => j.id)).toEqual(floorJobs);
		const wheelRows = await withClient(
			async (c) =>
				(
					await c.query(
						`SELECT w.id, w.bay_id, w.queue_position, w.state, w.version, w.started_at FROM wheels w WHERE w.job_id = ANY($1)`,
						[floorJobs]
					)
				).rows
		);
		expect(snap.wheels).toHaveLength(wheelRows.length);
		for (const row of wheelRows) {
			const w = snap.wheels.find((x: { id: number }) => x.id === row.id);
			expect(w).toMatchObject({
				bayId: row.bay_id,
				queuePosition: row.queue_position,
				state: row.state,
				version: row.version
			});
			expect(w.startedAt).toBe(row.started_at ? new Date(row.started_at).toISOString() : null);
		}
		for (const bay of snap.bays) {
			const lane = wheelRows
				.filter((x) => x.bay_id === bay.id && x.state !== 'done')
				.sort((a, b) => a.queue_position - b.queue_position)
				.map((x) => x.id);
			expect(bay.wheelIds, `bay ${bay.code}`).toEqual(lane);
		}
		const waitingIds = snap.waiting.map((x: { jobId: number }) => x.jobId);
		expect(waitingIds.indexOf(sooner.id)).toBeLessThan(waitingIds.indexOf(later.id));
		expect(snap.waiting.find((x: { jobId: number }) => x.jobId === sooner.id).wheelIds).toEqual(
			sooner.wheels.map((w: { id: number }) => w.id)
		);
		const sample = snap.jobs.find((j: { id: number }) => j.id === sooner.id);
		expect(sample).toMatchObject({
			number: sooner.number,
			kind: 'waiter',
			services: ['mount-balance'],
			customer: { name: 'Invented Test Customer' }
		});
		expect(typeof snap.cursor).toBe('number');
		const done = await withClient(
			async (c) =>
				(
					await c.query(
						`SELECT count(*)::int AS n FROM wheels w JOIN jobs j ON j.id = w.job_id WHERE j.store_id = $1 AND w.state = 'done'
			                  AND w.finished_at::date = (now() AT TIME ZONE 'UTC')::date`,
						[store.id]
					)
				).rows[0].n
		);
		expect(done).toBeGreaterThan(0); // the technician test above finished a wheel that stays done
		expect(snap.counters.wheelsDone).toBe(done);
	});
});

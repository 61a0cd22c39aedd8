// The live floor across two app instances (the built app, the real PostgreSQL): concurrent moves of one wheel,
// a stream that reconnects with its cursor, a LISTEN connection killed under load, rolled-back changes, and the
// NOTIFY payload. Each check says what would go wrong on a shop floor if it failed.
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient, testDatabaseUrl } from '../support/database';
import {
	client,
	openStream,
	signIn,
	startInstances,
	stopInstances,
	type Client,
	type Instance
} from '../support/instances';
import { createTestStore, newJob, type TestStore } from '../support/store';

let instances: Instance[];
let store: TestStore;
let leadA: Client;
let leadB: Client;
let cookie: string;

beforeAll(async () => {
	store = await createTestStore(`live-${process.pid}`);
	instances = await startInstances([3201, 3202]);
	cookie = await signIn(instances[0].url, store.people.lead.email, store.people.lead.password);
	// One session works on every instance: they share AUTH_SECRET and keep nothing in memory.
	leadA = client(instances[0].url, cookie);
	leadB = client(instances[1].url, cookie);
}, 60_000);

afterAll(async () => {
	await stopInstances(instances ?? []);
});

async function cursorNow(): Promise<number> {
	const { body } = await leadA.call('GET', '/api/board');
	return body.cursor;
}

async function eventRows(after: number) {
	return withClient(
		async (c) =>
			(await c.query('SELECT id, type FROM events WHERE store_id = $1 AND id > $2 ORDER BY id', [store.id, after])).rows
	);
}

describe('two app instances on one database', () => {
	it(
		'200 concurrent moves of one wheel at one version: exactly one wins, the rest get 409, one event',
		{ timeout: 60_000 },
		async () => {
			const created = await leadA.call('POST', '/api/jobs', newJob());
			expect(created.status).toBe(201);
			const wheel = created.body.wheels[0];
			const before = await cursorNow();
			const answers = await Promise.all(
				Array.from({ length: 200 }, (_, i) =>
					(i % 2 ? leadB : leadA).call('PATCH', `/api/wheels/${wheel.id}`, {
						version: wheel.version,
						bayId: store.bays[i % store.bays.length].id
					})
				)
			);
			const statuses = answers.map((a) => a.status);
			expect(
				statuses.filter((s) => s >= 500),
				'no 5xx'
			).toEqual([]);
			expect(statuses.filter((s) => s === 200)).toHaveLength(1);
			expect(statuses.filter((s) => s === 409)).toHaveLength(199);
			const conflict = answers.find((a) => a.status === 409)!.body;
			expect(conflict.code).toBe('version_conflict');
			expect(conflict.current.wheels[0]).toMatchObject({ id: wheel.id, version: wheel.version + 1 });
			const rows = await eventRows(before);
			expect(rows.filter((r) => r.type === 'wheel.moved')).toHaveLength(1);
		}
	);

	it(
		'a stream cut off during 300 changes on both instances gets all 300 after reconnecting with its cursor',
		{ timeout: 120_000 },
		async () => {
			const start = await cursorNow();
			const first = openStream(instances[0].url, cookie, start);
			await first.until((e) => e.some((x) => x.event === 'ready'));
			first.close();
			await first.closed;

			// 300 changes, half through each instance, ten at a time.
			for (let batch = 0; batch < 30; batch++) {
				const answers = await Promise.all(
					Array.from({ length: 10 }, (_, i) =>
						((batch * 10 + i) % 2 ? leadB : leadA).call('POST', '/api/jobs', newJob())
					)
				);
				expect(answers.map((a) => a.status)).toEqual(Array(10).fill(201));
			}
			const expected = (await eventRows(start)).map((r) => Number(r.id));
			expect(expected).toHaveLength(300);

			const again = openStream(instances[1].url, cookie, start);
			await again.until((e) => e.some((x) => x.event === 'ready'));
			const ids = again.floor().map((e) => e.id);
			again.close();
			expect(ids).toEqual(expected); // all of them, in id order, none twice
		}
	);

	it(
		'a killed LISTEN connection reconnects, and events committed meanwhile still arrive',
		{ timeout: 60_000 },
		async () => {
			const stream = openStream(instances[0].url, cookie, await cursorNow());
			await stream.until((e) => e.some((x) => x.event === 'ready'));
			const name = `lugline-listen:${instances[0].port}`;
			const killed = await withClient(async (c) => {
				const { rows } = await c.query('SELECT pid FROM pg_stat_activity WHERE application_name = $1', [name]);
				expect(rows).toHaveLength(1);
				await c.query('SELECT pg_terminate_backend($1)', [rows[0].pid]);
				return rows[0].pid as number;
			});
			// Changes made through the other instance while instance A has no LISTEN connection.
			const made: number[] = [];
			for (let i = 0; i < 5; i++) {
				const r = await leadB.call('POST', '/api/jobs', newJob());
				expect(r.status).toBe(201);
				made.push(r.body.id);
			}
			await stream.until((e) =>
				made.every((id) => e.some((x) => x.event === 'floor' && x.data.jobs.some((j: { id: number }) => j.id === id)))
			);
			stream.close();
			const after = await withClient(
				async (c) => (await c.query('SELECT pid FROM pg_stat_activity WHERE application_name = $1', [name])).rows
			);
			expect(after).toHaveLength(1);
			expect(after[0].pid).not.toBe(killed);
		}
	);

	it(
		'a job with 100 KB of notes: the NOTIFY payload is only the event id, and screens get a short preview',
		{ timeout: 30_000 },
		async () => {
			const listener = new pg.Client({ connectionString: testDatabaseUrl });
			await listener.connect();
			const payloads: string[] = [];
			listener.on('notification', (n) => payloads.push(n.payload ?? ''));
			await listener.query('LISTEN lugline_events');
			const stream = openStream(instances[1].url, cookie, await cursorNow());
			await stream.until((e) => e.some((x) => x.event === 'ready'));
			try {
				const notes = `${'Customer reports a shake at highway speed. '.repeat(2400).slice(0, 99_999)}.`;
				const r = await leadA.call('POST', '/api/jobs', newJob({ notes }));
				expect(r.status).toBe(201);
				expect(r.body.notes).toHaveLength(100_000);
				await stream.until((e) =>
					e.some((x) => x.event === 'floor' && x.data.jobs.some((j: { id: number }) => j.id === r.body.id))
				);
				await new Promise((done) => setTimeout(done, 200));
				const [event] = await withClient(
					async (c) =>
						(
							await c.query(`SELECT id FROM events WHERE store_id = $1 AND entity = 'job' AND entity_id = $2`, [
								store.id,
								r.body.id
							])
						).rows
				);
				expect(payloads).toContain(String(event.id));
				expect(payloads.every((p) => /^\d+$/.test(p))).toBe(true);
				const streamed = stream.floor().find((e) => e.jobs.some((j: { id: number }) => j.id === r.body.id));
				expect(streamed.jobs[0].notesPreview.length).toBeLessThanOrEqual(280);
				expect(JSON.stringify(streamed).length).toBeLessThan(5_000);
			} finally {
				stream.close();
				await listener.end();
			}
		}
	);

	it('a stream closes when its user is disabled, and a stale cursor gets one resync', { timeout: 30_000 }, async () => {
		const tech = store.people.tech2;
		const techCookie = await signIn(instances[1].url, tech.email, tech.password);
		const stream = openStream(instances[1].url, techCookie, await cursorNow());
		await stream.until((e) => e.some((x) => x.event === 'ready'));
		await withClient((c) =>
			c.query('UPDATE users SET active = false, session_version = session_version + 1 WHERE id = $1', [tech.id])
		);
		try {
			await stream.until((e) => e.some((x) => x.event === 'closed'), 15_000);
			expect(stream.events.map((e) => e.event)).toContain('signed_out');
			const again = await client(instances[1].url, techCookie).call('GET', '/api/board');
			expect(again.status).toBe(401);
		} finally {
			await withClient((c) => c.query('UPDATE users SET active = true WHERE id = $1', [tech.id]));
		}
		await withClient((c) =>
			c.query('UPDATE stores SET events_pruned_to = $2 WHERE id = $1', [store.id, 1_000_000_000])
		);
		try {
			const stale = openStream(instances[0].url, cookie, 5);
			await stale.until((e) => e.some((x) => x.event === 'closed'));
			expect(stale.events.map((e) => e.event)).toEqual(['resync', 'closed']);
			expect(stale.events[0].data.reason).toBe('too_old');
		} finally {
			await withClient((c) => c.query('UPDATE stores SET events_pruned_to = 0 WHERE id = $1', [store.id]));
		}
	});

	it(
		'a board loaded again after a change made through the other instance shows the change',
		{ timeout: 30_000 },
		async () => {
			const before = await leadA.call('GET', '/api/board'); // fills instance A's copy of the board
			const stream = openStream(instances[0].url, cookie, before.body.cursor);
			await stream.until((e) => e.some((x) => x.event === 'ready'));
			const made = await leadB.call('POST', '/api/jobs', newJob());
			expect(made.status).toBe(201);
			// Once instance A has heard of the change, its board must include it.
			await stream.until((e) =>
				e.some((x) => x.event === 'floor' && x.data.jobs.some((j: { id: number }) => j.id === made.body.id))
			);
			stream.close();
			const after = await leadA.call('GET', '/api/board');
			expect(after.body.jobs.map((j: { id: number }) => j.id)).toContain(made.body.id);
			expect(after.body.cursor).toBeGreaterThan(before.body.cursor);
		}
	);
});

// The database restarts (`pg_ctl restart`, fast mode) while screens make about 100 changes a second through two
// instances. Every change that got a 2xx is in the database afterwards; changes during the outage get 503 within
// 5 s (never a 500, never a hang); health and the event streams are back within 10 s of the database accepting
// connections; neither instance crashes.
import { spawn } from 'node:child_process';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { testDatabaseUrl, withClient } from '../support/database';
import {
	logEntries,
	openStream,
	signIn,
	startInstances,
	stopInstances,
	type Instance,
	type Stream
} from '../support/instances';
import { createTestStore, newJob, type TestStore } from '../support/store';

let instances: Instance[] = [];
let store: TestStore;

beforeAll(async () => {
	store = await createTestStore(`restart-${process.pid}`);
	instances = await startInstances([3661, 3662]);
}, 60_000);

afterAll(async () => {
	await stopInstances(instances);
});

interface Outcome {
	kind: 'create' | 'edit';
	status: number;
	ms: number;
	startedAt: number;
	body: any;
	sent: any;
}

function restartDatabase(): Promise<void> {
	return new Promise((resolve, reject) => {
		const child = spawn(process.execPath, ['scripts/db.mjs', 'restart', '--test'], { stdio: 'pipe' });
		let out = '';
		child.stdout.on('data', (d) => (out += d));
		child.stderr.on('data', (d) => (out += d));
		child.on('exit', (code) => (code === 0 ? resolve() : reject(new Error(`restart failed: ${out}`))));
	});
}

async function accepting(): Promise<boolean> {
	const c = new pg.Client({ connectionString: testDatabaseUrl, connectionTimeoutMillis: 500 });
	c.on('error', () => {});
	try {
		await c.connect();
		await c.query('SELECT 1');
		return true;
	} catch {
		return false;
	} finally {
		await c.end().catch(() => {});
	}
}

describe('a database restart under load', () => {
	it('loses no acknowledged change, answers 503 quickly meanwhile, and recovers within 10 s', async () => {
		const cookies = await Promise.all(
			instances.map((i) => signIn(i.url, store.people.writer.email, store.people.writer.password))
		);
		const cursor = await withClient(async (c) =>
			Number((await c.query('SELECT max(id) AS id FROM events')).rows[0].id)
		);
		const streams: Stream[] = instances.map((i, n) => openStream(i.url, cookies[n], cursor));
		await Promise.all(streams.map((s) => s.until((e) => e.some((x) => x.event === 'ready'), 10_000)));

		const outcomes: Outcome[] = [];
		const inFlight = new Set<Promise<void>>();
		const known: { id: number; version: number }[] = [];
		let n = 0;
		let running = true;
		const send = (kind: Outcome['kind'], path: string, method: string, body: any, at: Instance, cookie: string) => {
			const startedAt = Date.now();
			const p = fetch(`${at.url}${path}`, {
				method,
				headers: { origin: at.url, cookie, 'content-type': 'application/json' },
				body: JSON.stringify(body),
				signal: AbortSignal.timeout(15_000)
			})
				.then(async (r) => {
					const text = await r.text();
					let parsed: any = text;
					try {
						parsed = JSON.parse(text);
					} catch {
						// keep the text
					}
					outcomes.push({ kind, status: r.status, ms: Date.now() - startedAt, startedAt, body: parsed, sent: body });
					if (kind === 'create' && r.status === 201) known.push({ id: parsed.id, version: parsed.version });
				})
				.catch((e) => {
					outcomes.push({ kind, status: 0, ms: Date.now() - startedAt, startedAt, body: String(e), sent: body });
				})
				.finally(() => inFlight.delete(p));
			inFlight.add(p);
		};
		// About 100 changes a second, alternating instances: mostly new jobs, some edits of jobs made earlier.
		const loadStarted = Date.now();
		const load = (async () => {
			while (running) {
				const i = n % 2;
				n++;
				if (n % 4 === 0 && known.length > 0) {
					const job = known[Math.floor(Math.random() * known.length)];
					send(
						'edit',
						`/api/jobs/${job.id}`,
						'PATCH',
						{ version: job.version, notes: `edit ${n}` },
						instances[i],
						cookies[i]
					);
				} else {
					send('create', '/api/jobs', 'POST', newJob({ notes: `load ${n}` }), instances[i], cookies[i]);
				}
				// On a 10 ms schedule (not 10 ms after each send), so slow moments are caught up.
				await new Promise((r) => setTimeout(r, Math.max(0, loadStarted + n * 10 - Date.now())));
			}
		})();

		await new Promise((r) => setTimeout(r, 3000));
		const restartAt = Date.now();
		await restartDatabase();
		// The moment the database accepts connections again (pg_ctl -w returns once it does; checked directly).
		while (!(await accepting())) await new Promise((r) => setTimeout(r, 50));
		const upAt = Date.now();

		// Health on both instances within 10 s of that moment.
		const healthy = await Promise.all(
			instances.map(async (i) => {
				for (;;) {
					const r = await fetch(`${i.url}/api/health`).catch(() => null);
					if (r?.status === 200) return Date.now() - upAt;
					if (Date.now() - upAt > 10_000) return Infinity;
					await new Promise((res) => setTimeout(res, 100));
				}
			})
		);
		// The streams: a change made now reaches both instances' open streams within 10 s of the database being back.
		let probeId = 0;
		for (;;) {
			const r = await fetch(`${instances[0].url}/api/jobs`, {
				method: 'POST',
				headers: { origin: instances[0].url, cookie: cookies[0], 'content-type': 'application/json' },
				body: JSON.stringify(newJob({ notes: 'after the restart' }))
			});
			if (r.status === 201) {
				probeId = (await r.json()).id;
				break;
			}
			if (Date.now() - upAt > 10_000) break;
			await new Promise((res) => setTimeout(res, 100));
		}
		expect(probeId, 'a change succeeds within 10 s').toBeGreaterThan(0);
		const carries = (s: Stream) => s.events.some((e) => e.data?.jobs?.some?.((j: any) => j.id === probeId));
		await Promise.all(streams.map((s) => s.until(() => carries(s), Math.max(1, 10_000 - (Date.now() - upAt)))));
		const streamsBackMs = Date.now() - upAt;

		await new Promise((r) => setTimeout(r, 3000));
		running = false;
		await load;
		await Promise.all([...inFlight]);
		const endedAt = Date.now();
		for (const s of streams) s.close();

		// Every acknowledged change is in the database.
		const created = outcomes.filter((o) => o.kind === 'create' && o.status === 201);
		const rows = await withClient(
			async (c) =>
				(await c.query('SELECT id, notes, version FROM jobs WHERE id = ANY($1)', [created.map((o) => o.body.id)])).rows
		);
		const byId = new Map(rows.map((r) => [r.id, r]));
		for (const o of created) expect(byId.get(o.body.id)?.id, `job ${o.body.id}`).toBe(o.body.id);
		const edits = outcomes.filter((o) => o.kind === 'edit' && o.status === 200);
		const edited = await withClient(
			async (c) =>
				(await c.query('SELECT id, version FROM jobs WHERE id = ANY($1)', [edits.map((o) => o.body.id)])).rows
		);
		const versions = new Map(edited.map((r) => [r.id, r.version]));
		for (const o of edits) expect(versions.get(o.body.id)).toBeGreaterThanOrEqual(o.body.version);

		// Nothing but success, a conflict (an edit racing another) or 503; 503s answered within 5 s; no hang, no 500.
		const statuses = new Map<number, number>();
		for (const o of outcomes) statuses.set(o.status, (statuses.get(o.status) ?? 0) + 1);
		const unavailable = outcomes.filter((o) => o.status === 503);
		const slowest503 = Math.max(0, ...unavailable.map((o) => o.ms));
		const seconds = (endedAt - restartAt + 3000) / 1000;
		console.log(
			`restart: ${outcomes.length} changes in about ${seconds.toFixed(0)} s (${(outcomes.length / seconds).toFixed(0)}/s); ` +
				`answers ${JSON.stringify(Object.fromEntries(statuses))} (${unavailable.filter((o) => o.body.code === 'busy').length} of the 503s shed as busy); outage ${upAt - restartAt} ms; slowest 503 ${slowest503} ms; ` +
				`health back ${healthy.map((h) => `${h} ms`).join(' and ')} after the database; streams ${streamsBackMs} ms`
		);
		for (const i of instances)
			for (const e of logEntries(i).filter((x) => x.level === 'error'))
				console.log(`instance ${i.port} error: ${JSON.stringify(e).slice(0, 1500)}`);
		for (const o of outcomes) {
			expect([200, 201, 409, 503], `${o.kind} → ${o.status} ${JSON.stringify(o.body).slice(0, 200)}`).toContain(
				o.status
			);
		}
		expect(unavailable.length, 'some changes met the outage').toBeGreaterThan(0);
		for (const o of unavailable) {
			expect(o.ms).toBeLessThan(5000);
			// The database away, or (just after it is back) new requests shed while the backlog drains.
			expect(['database_unavailable', 'busy']).toContain(o.body.code);
		}
		for (const h of healthy) expect(h).toBeLessThan(10_000);
		expect(streamsBackMs).toBeLessThan(10_000);
		expect(outcomes.length / seconds).toBeGreaterThan(60);
		for (const i of instances) expect(i.process.exitCode, `instance ${i.port} still running`).toBeNull();
	});
});

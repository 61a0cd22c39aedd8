// Authorisation beyond the role matrix (tests/e2e/role-matrix.test.ts asks every entry of the table as every role and
// as nobody): a disabled user is refused everywhere, form actions posted directly are refused under a guarded
// layout, and one store's staff cannot read or change another store's jobs, wheels, records, photos or reports by
// id: 403 or 404, nothing changed, and the denial in the log with who asked.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { authorisation } from '../../src/lib/server/authz';
import { withClient } from '../support/database';
import {
	client,
	logEntries,
	signIn,
	startInstances,
	stopInstances,
	type Client,
	type Instance
} from '../support/instances';
import { urlFor } from '../support/routes';
import { createTestStore, newJob, type TestStore } from '../support/store';

let instance: Instance;
let mine: TestStore;
let theirs: TestStore;
const as: Record<string, Client> = {};
const cookies: Record<string, string> = {};
let theirJob: { id: number; version: number; wheels: { id: number; version: number }[] };
let theirPhotoId: number;

async function snapshot(storeId: number) {
	return withClient(async (c) => ({
		jobs: (await c.query('SELECT id, version, state, notes FROM jobs WHERE store_id = $1 ORDER BY id', [storeId])).rows,
		wheels: (
			await c.query(
				`SELECT w.id, w.version, w.state, w.bay_id FROM wheels w JOIN jobs j ON j.id = w.job_id
				 WHERE j.store_id = $1 ORDER BY w.id`,
				[storeId]
			)
		).rows,
		records: (
			await c.query(
				'SELECT * FROM wheel_records r JOIN wheels w ON w.id = r.wheel_id JOIN jobs j ON j.id = w.job_id WHERE j.store_id = $1',
				[storeId]
			)
		).rows.length,
		photos: (await c.query('SELECT count(*)::int AS n FROM photos WHERE store_id = $1', [storeId])).rows[0].n,
		events: (await c.query('SELECT count(*)::int AS n FROM events WHERE store_id = $1', [storeId])).rows[0].n,
		outbox: (await c.query('SELECT count(*)::int AS n FROM outbox WHERE store_id = $1', [storeId])).rows[0].n
	}));
}

beforeAll(async () => {
	mine = await createTestStore(`acc-a-${process.pid}`);
	theirs = await createTestStore(`acc-b-${process.pid}`);
	[instance] = await startInstances([3621]);
	for (const key of ['lead', 'writer', 'tech', 'manager'] as const) {
		cookies[key] = await signIn(instance.url, mine.people[key].email, mine.people[key].password);
		as[key] = client(instance.url, cookies[key]);
	}
	const theirWriter = client(
		instance.url,
		await signIn(instance.url, theirs.people.writer.email, theirs.people.writer.password)
	);
	const created = await theirWriter.call('POST', '/api/jobs', newJob({ notes: 'theirs' }));
	expect(created.status).toBe(201);
	theirJob = created.body;
	// A photo row of theirs (its object need not exist: the answer must come before storage is asked).
	theirPhotoId = await withClient(
		async (c) =>
			(
				await c.query(
					`INSERT INTO photos (store_id, job_id, wheel_id, object_key, content_type, size_bytes)
					 VALUES ($1, $2, $3, $4, 'image/jpeg', 10) RETURNING id`,
					[theirs.id, theirJob.id, theirJob.wheels[0].id, `stores/${theirs.id}/photos/access-test-${process.pid}.jpg`]
				)
			).rows[0].id
	);
}, 60_000);

afterAll(async () => {
	await stopInstances(instance ? [instance] : []);
});

describe('another store’s rows', () => {
	it('are not found for reading or changing, nothing changes, and each denial is logged', async () => {
		const before = await snapshot(theirs.id);
		const wheel = theirJob.wheels[0];
		const tries: [Client, string, string, unknown?][] = [
			[as.manager, 'GET', `/api/jobs/${theirJob.id}`],
			[
				as.writer,
				'PATCH',
				`/api/jobs/${theirJob.id}`,
				{ version: theirJob.version, notes: 'changed by another store' }
			],
			[as.writer, 'PATCH', `/api/jobs/${theirJob.id}`, { version: theirJob.version, state: 'cancelled' }],
			[as.writer, 'POST', `/api/jobs/${theirJob.id}/summary`, {}],
			[as.lead, 'PATCH', `/api/wheels/${wheel.id}`, { version: wheel.version, bayId: mine.bays[0].id }],
			[as.lead, 'PATCH', `/api/wheels/${wheel.id}`, { version: wheel.version, state: 'working' }],
			[
				as.lead,
				'POST',
				'/api/wheels/move',
				{ wheels: [{ id: wheel.id, version: wheel.version }], bayId: mine.bays[0].id }
			],
			[as.manager, 'GET', `/api/wheels/${wheel.id}/record`],
			[as.lead, 'PUT', `/api/wheels/${wheel.id}/record`, { version: 0, treadDepthMm: 5 }],
			[as.manager, 'GET', `/api/wheels/${wheel.id}/photos`],
			[as.manager, 'GET', `/api/photos/${theirPhotoId}`]
		];
		for (const [who, method, path, body] of tries) {
			const r = await who.call(method, path, body);
			expect([403, 404], `${method} ${path} → ${r.status} ${JSON.stringify(r.body)}`).toContain(r.status);
			expect(typeof r.body.message).toBe('string');
		}
		// A photo upload to their wheel: refused before the file is read.
		const form = new FormData();
		form.set('photo', new Blob([new Uint8Array([0xff, 0xd8, 0xff, 0xd9])], { type: 'image/jpeg' }), 'x.jpg');
		const upload = await fetch(`${instance.url}/api/wheels/${wheel.id}/photos`, {
			method: 'POST',
			headers: { origin: instance.url, cookie: cookies.lead },
			body: form
		});
		expect([403, 404]).toContain(upload.status);

		expect(await snapshot(theirs.id)).toEqual(before);

		// Logged: every refusal with the asker's user and store, under the request's id.
		const refused = logEntries(instance).filter((e) => e.msg === 'request refused' && e.storeId === mine.id);
		for (const [, method, path] of tries) {
			const entry = refused.find((e) => e.method === method && e.path === path);
			expect(entry, `log entry for ${method} ${path}`).toBeDefined();
			expect([403, 404]).toContain(entry!.status);
			expect(typeof entry!.userId).toBe('number');
			expect(entry!.requestId).toMatch(/^[0-9a-f-]{36}$/);
		}
	});

	it('reports only ever count the asker’s own store, whatever the address says', async () => {
		// Finish one of their wheels today: their throughput report has it, ours must not.
		await withClient((c) =>
			c.query(
				`UPDATE wheels SET state = 'done', started_at = now() - interval '10 minutes', finished_at = now() WHERE id = $1`,
				[theirJob.wheels[1].id]
			)
		);
		const today = new Date().toISOString().slice(0, 10);
		const tomorrow = new Date(Date.now() + 86_400_000).toISOString().slice(0, 10);
		const theirManager = client(
			instance.url,
			await signIn(instance.url, theirs.people.manager.email, theirs.people.manager.password)
		);
		const path = `/api/reports/throughput?from=${today}&to=${tomorrow}`;
		const wheelsIn = (csv: string) =>
			csv
				.trim()
				.split('\n')
				.slice(1)
				.reduce((n, line) => n + Number(line.split(',')[1] ?? 0), 0);
		const theirsCsv = String((await theirManager.call('GET', path)).body);
		expect(wheelsIn(theirsCsv)).toBeGreaterThanOrEqual(1);
		for (const attempt of [path, `${path}&store=${theirs.id}`, `${path}&storeId=${theirs.id}`]) {
			const ours = await as.manager.call('GET', attempt);
			expect(ours.status).toBe(200);
			expect(wheelsIn(String(ours.body)), attempt).toBe(0);
		}
	});
});

describe('refused people', () => {
	it('a disabled user is refused by every entry of the authorisation table on the next request', async () => {
		const person = mine.people.tech2;
		const cookie = await signIn(instance.url, person.email, person.password);
		await withClient((c) => c.query('UPDATE users SET active = false WHERE id = $1', [person.id]));
		try {
			let asked = 0;
			for (const [routeId, rule] of Object.entries(authorisation)) {
				const url = `${instance.url}${urlFor(routeId)}`;
				const headers = { origin: instance.url, cookie, accept: 'text/html' };
				if (rule.kind === 'api') {
					for (const [method, access] of Object.entries(rule.methods)) {
						const r = await fetch(url, {
							method,
							headers: { ...headers, 'content-type': 'application/json' },
							body: method === 'GET' ? undefined : '{}',
							redirect: 'manual'
						});
						asked++;
						if (access === 'public') expect(r.status, `${method} ${url}`).toBeLessThan(500);
						else expect(r.status, `${method} ${url}`).toBe(401);
					}
					continue;
				}
				const page = await fetch(url, { headers, redirect: 'manual' });
				asked++;
				if (rule.load === 'public') expect(page.status, `GET ${url}`).toBeLessThan(400);
				else {
					expect(page.status, `GET ${url}`).toBe(303);
					expect(page.headers.get('location'), `GET ${url}`).toMatch(/^\/signin/);
				}
				for (const [action, access] of Object.entries(rule.actions ?? {})) {
					if (access === 'public') continue;
					// Posted directly, as a script would, not from the page: still refused.
					const target = action === 'default' ? url : `${url}?/${action}`;
					const r = await fetch(target, {
						method: 'POST',
						headers: { ...headers, 'content-type': 'application/x-www-form-urlencoded' },
						body: 'id=1&version=1',
						redirect: 'manual'
					});
					asked++;
					expect(r.status, `POST ${target}`).toBe(401);
				}
			}
			expect(asked).toBeGreaterThan(30);
			// Same person, fresh sign-in: refused like a wrong password.
			const again = await fetch(`${instance.url}/signin`, {
				method: 'POST',
				headers: { origin: instance.url, 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
				body: new URLSearchParams({ email: person.email, password: person.password }),
				redirect: 'manual'
			});
			expect(again.status).toBe(400);
		} finally {
			await withClient((c) => c.query('UPDATE users SET active = true WHERE id = $1', [person.id]));
		}
	});

	it('a writer posting a manager’s form action directly is refused and nothing is added', async () => {
		// A writer posting a manager's form action directly: 403, nothing changed.
		const before = await withClient(async (c) => (await c.query('SELECT count(*)::int AS n FROM users')).rows[0].n);
		const r = await fetch(`${instance.url}/manage?/add`, {
			method: 'POST',
			headers: {
				origin: instance.url,
				cookie: await signIn(instance.url, mine.people.writer.email, mine.people.writer.password),
				'content-type': 'application/x-www-form-urlencoded'
			},
			body: new URLSearchParams({
				name: 'Invented Intruder',
				email: 'intruder@x.lugline.test',
				role: 'manager',
				password: 'long-enough-password'
			}),
			redirect: 'manual'
		});
		expect(r.status).toBe(403);
		expect(await withClient(async (c) => (await c.query('SELECT count(*)::int AS n FROM users')).rows[0].n)).toBe(
			before
		);
	});
});

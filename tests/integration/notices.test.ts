// Customer notices end to end: two app instances from the build (3221, 3222) write notices to the outbox as jobs
// finish, their sender loops deliver them over real SMTP to a catcher (scripts/mail-catcher.mjs) that this file
// starts, stops and starts again, and the messages are read back from the catcher's folder. The catcher is this
// file's own (port 54389, `.data/mail-test-notices`) and not the one `npm test` runs for everything else, because
// one test stops it. Every customer address carries this process's id, so the checks count only this run's mail.
import { resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../support/database';
import { client, signIn, startInstances, stopInstances, type Client, type Instance } from '../support/instances';
import { eventually, mailTo, startCatcher, type Catcher, type CaughtMail } from '../support/mail';
import { createTestStore, newJob, type TestStore } from '../support/store';

const SMTP_PORT = Number(process.env.LUGLINE_NOTICES_SMTP_PORT ?? 54389);
const MAIL_DIR = resolve(process.env.LUGLINE_DATA_DIR ?? '.data', 'mail-test-notices');
const run = `${process.pid}-${Date.now().toString(36)}`;
const address = (who: string) => `${who}.${run}@example.test`;

let catcher: Catcher | undefined;
let instances: Instance[] = [];
let store: TestStore;
let other: TestStore;
/** `as.lead[0]` talks to instance A, `as.lead[1]` to instance B, with the same session. */
const as: Record<string, Client[]> = {};
const cookies: Record<string, string> = {};

const STORE_CONTACT = {
	phone: '+1 555 0100 (invented)',
	email: `counter.${run}@example.test`,
	address: '1 Invented Way, Testville'
};

beforeAll(async () => {
	catcher = await startCatcher(SMTP_PORT, MAIL_DIR);
	store = await createTestStore(`notices-${process.pid}`);
	other = await createTestStore(`notices-other-${process.pid}`);
	await withClient((c) =>
		c.query('UPDATE stores SET phone = $2, email = $3, address = $4, notices_enabled = true WHERE id = $1', [
			store.id,
			STORE_CONTACT.phone,
			STORE_CONTACT.email,
			STORE_CONTACT.address
		])
	);
	instances = await startInstances([3221, 3222], {
		SMTP_PORT: String(SMTP_PORT),
		// A quick sender, so the test waits for seconds, not minutes.
		MAIL_POLL_MS: '150',
		MAIL_RETRY_BASE_MS: '300',
		MAIL_RETRY_MAX_MS: '1000',
		MAIL_MAX_ATTEMPTS: '50'
	});
	for (const key of ['lead', 'writer', 'tech', 'manager'] as const) {
		cookies[key] = await signIn(instances[0].url, store.people[key].email, store.people[key].password);
		as[key] = instances.map((i) => client(i.url, cookies[key]));
	}
	const otherCookie = await signIn(instances[0].url, other.people.writer.email, other.people.writer.password);
	as.otherWriter = instances.map((i) => client(i.url, otherCookie));
}, 60_000);

afterAll(async () => {
	await stopInstances(instances);
	await catcher?.stop();
});

interface Job {
	id: number;
	number: number;
	wheels: { id: number; version: number; position: string }[];
}

async function createJob(customer: Record<string, unknown>, wheels = ['LF'], via = 0): Promise<Job> {
	const r = await as.writer[via].call('POST', '/api/jobs', newJob({ customer, wheels }));
	expect(r.status, JSON.stringify(r.body)).toBe(201);
	return r.body;
}

/** Moves the job's wheels into a bay (instance A's: 1, B's: 2), then starts and finishes them through `via`. */
async function work(job: Job, { via = 0, finish = job.wheels.length } = {}) {
	const lead = as.lead[via];
	const moved = await lead.call('POST', '/api/wheels/move', {
		wheels: job.wheels.map((w) => ({ id: w.id, version: w.version })),
		bayId: store.bays[via].id
	});
	expect(moved.status, JSON.stringify(moved.body)).toBe(200);
	const versions = new Map<number, number>(
		moved.body.wheels.map((w: { id: number; version: number }) => [w.id, w.version])
	);
	const finishes = [];
	for (const wheel of job.wheels.slice(0, finish)) {
		const started = await lead.call('PATCH', `/api/wheels/${wheel.id}`, {
			version: versions.get(wheel.id),
			state: 'working'
		});
		expect(started.status, JSON.stringify(started.body)).toBe(200);
		const now = started.body.wheels.find((w: { id: number }) => w.id === wheel.id);
		const done = await lead.call('PATCH', `/api/wheels/${wheel.id}`, { version: now.version, state: 'done' });
		expect(done.status, JSON.stringify(done.body)).toBe(200);
		finishes.push(done);
	}
	return finishes;
}

interface OutboxRow {
	id: number;
	kind: string;
	to_name: string;
	to_address: string;
	send_after: Date | number;
	attempts: number;
	last_error: string | null;
	sent_at: Date | null;
}

const outboxOf = (jobId: number): Promise<OutboxRow[]> =>
	withClient(async (c) => (await c.query('SELECT * FROM outbox WHERE job_id = $1 ORDER BY id', [jobId])).rows);

const settle = (ms = 1200) => new Promise((r) => setTimeout(r, ms));

/** The header block of a raw message, with folded lines joined. */
function headerLines(raw: string): string[] {
	const head = raw.split(/\r?\n\r?\n/)[0];
	return head.replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/);
}

function expectSafeHtml(mail: CaughtMail) {
	// No element that loads anything (no tracking pixel, no remote image), and no link out but tel: and mailto:.
	expect(mail.html).not.toMatch(/<(img|script|iframe|link|object|embed|video|audio|source)\b/i);
	expect(mail.html).not.toMatch(/<[^>]*\s(src|background|srcset)=/i);
	expect(mail.html).not.toMatch(/url\(|https?:\/\//i);
	for (const [, href] of mail.html.matchAll(/href="([^"]*)"/g)) expect(href).toMatch(/^(tel|mailto):/);
}

describe('ready for pickup', () => {
	let job: Job;
	const to = address('ann');

	it('finishing the job’s last wheel sends exactly one ready message, with the right recipient and job', async () => {
		job = await createJob({ name: 'Ann Invented', email: to, notifyEmail: true }, ['LF', 'RF']);

		// The first of two wheels: the job is not done, nothing is written.
		await work(job, { finish: 1 });
		expect(await outboxOf(job.id)).toEqual([]);

		const rf = (await as.lead[1].call('GET', `/api/jobs/${job.id}`)).body.wheels.find(
			(w: { position: string }) => w.position === 'RF'
		);
		const started = await as.lead[1].call('PATCH', `/api/wheels/${rf.id}`, { version: rf.version, state: 'working' });
		expect(started.status).toBe(200);
		const v = started.body.wheels.find((w: { id: number }) => w.id === rf.id).version;
		const done = await as.lead[1].call('PATCH', `/api/wheels/${rf.id}`, { version: v, state: 'done' });
		expect(done.status, JSON.stringify(done.body)).toBe(200);

		const [mail] = await eventually(() => mailTo(to, MAIL_DIR).length > 0 && mailTo(to, MAIL_DIR), 'the ready message');
		await settle();
		expect(mailTo(to, MAIL_DIR)).toHaveLength(1);
		expect(mail.envelope.to).toEqual([to]);
		expect(mail.to).toEqual([{ name: 'Ann Invented', address: to }]);
		expect(mail.from[0]).toMatchObject({ address: 'notices@demo.lugline.test' });
		expect(mail.replyTo).toEqual([{ name: expect.stringContaining('Test store'), address: STORE_CONTACT.email }]);
		expect(mail.subject).toContain(`job ${job.number}`);
		expect(mail.subject).toMatch(/ready for pickup/);
		expect(mail.text).toContain(`Job number: ${job.number}`);
		expect(mail.text).toContain('Hello Ann Invented,');
		expect(mail.text).toContain(STORE_CONTACT.phone);
		expect(mail.text).toContain(STORE_CONTACT.address);
		expect(mail.text).toMatch(/50–100 miles/);
		expect(mail.html).toContain(`Job number: ${job.number}`);
		expect(mail.messageId).toMatch(/^<outbox-\d+\.\d+@demo\.lugline\.test>$/);
		expect(headerLines(mail.raw)).toContain('Auto-Submitted: auto-generated');
		expectSafeHtml(mail);
	});

	it('the ready notice and the re-torque reminder were written with the finish, each with an audit row', async () => {
		const rows = await outboxOf(job.id);
		expect(rows.map((r) => r.kind)).toEqual(['ready', 'retorque']);
		const [ready, retorque] = rows;
		expect(ready.sent_at).not.toBeNull();
		expect(ready.attempts).toBe(1);
		expect(retorque.sent_at).toBeNull();
		// Due after the store's interval (3 days by default).
		const due = new Date(retorque.send_after as Date).getTime() - Date.now();
		expect(due).toBeGreaterThan(2.9 * 86_400_000);
		expect(due).toBeLessThan(3.1 * 86_400_000);
		const audit = await withClient(
			async (c) =>
				(
					await c.query(
						`SELECT entity_id, user_id, detail FROM audit WHERE entity = 'outbox' AND entity_id = ANY($1) ORDER BY entity_id`,
						[rows.map((r) => r.id)]
					)
				).rows
		);
		expect(audit).toEqual([
			{ entity_id: Number(ready.id), user_id: store.people.lead.id, detail: { kind: 'ready', job: job.number } },
			{ entity_id: Number(retorque.id), user_id: store.people.lead.id, detail: { kind: 'retorque', job: job.number } }
		]);
	});

	it('the re-torque reminder goes out when it is due, and says why', async () => {
		const [, retorque] = await outboxOf(job.id);
		await withClient((c) => c.query('UPDATE outbox SET send_after = now() WHERE id = $1', [retorque.id]));
		const reminder = await eventually(
			() => mailTo(to, MAIL_DIR).find((m) => /re-torqued/.test(m.subject)),
			'the re-torque reminder'
		);
		expect(reminder.subject).toContain(`job ${job.number}`);
		expect(reminder.text).toMatch(
			/Re-checking the lug nut torque after the first 50–100 miles \(80–160 km\) is common practice/
		);
		expectSafeHtml(reminder);
		await settle(600);
		expect(mailTo(to, MAIL_DIR).filter((m) => /re-torqued/.test(m.subject))).toHaveLength(1);
	});

	it('no notice for a customer who did not opt in, nor for one with no address', async () => {
		const quiet = address('quiet');
		const noOptIn = await createJob({ name: 'Quiet Invented', email: quiet, notifyEmail: false });
		await work(noOptIn, { via: 1 });
		const noAddress = await createJob({ name: 'Addressless Invented', notifyEmail: true });
		await work(noAddress);
		expect(await outboxOf(noOptIn.id)).toEqual([]);
		expect(await outboxOf(noAddress.id)).toEqual([]);
		await settle();
		expect(mailTo(quiet, MAIL_DIR)).toEqual([]);
	});
});

describe('when the mail server is away', () => {
	it('the finish commits, the notice waits with its error, and it is sent once the catcher is back', async () => {
		const to = address('outage');
		const job = await createJob({ name: 'Otto Invented', email: to, notifyEmail: true });
		await catcher!.stop();
		try {
			const [done] = await work(job, { via: 1 });
			expect(done.status).toBe(200);
			const state = await withClient(
				async (c) =>
					(
						await c.query(
							`SELECT j.state AS job, w.state AS wheel FROM jobs j JOIN wheels w ON w.job_id = j.id WHERE j.id = $1`,
							[job.id]
						)
					).rows
			);
			expect(state).toEqual([{ job: 'done', wheel: 'done' }]);

			const waiting = await eventually(async () => {
				const [ready] = await outboxOf(job.id);
				return ready && ready.attempts >= 2 && ready;
			}, 'two failed attempts');
			expect(waiting.sent_at).toBeNull();
			expect(waiting.last_error).toMatch(/ECONNREFUSED|connect/i);
			expect(waiting.last_error).not.toMatch(/Gave up/);
			expect(mailTo(to, MAIL_DIR)).toEqual([]);
		} finally {
			catcher = await startCatcher(SMTP_PORT, MAIL_DIR, { keep: true });
		}
		const [mail] = await eventually(
			() => mailTo(to, MAIL_DIR).length > 0 && mailTo(to, MAIL_DIR),
			'the message after the catcher came back'
		);
		expect(mail.subject).toContain(`job ${job.number}`);
		const [ready] = await outboxOf(job.id);
		expect(ready.sent_at).not.toBeNull();
		expect(ready.attempts).toBeGreaterThanOrEqual(3);
		await settle();
		expect(mailTo(to, MAIL_DIR)).toHaveLength(1);
	}, 30_000);
});

describe('header injection', () => {
	it('a name or a store name containing CR LF Bcc: adds no header and no recipient', async () => {
		const to = address('mallory');
		const storeName = await withClient(
			async (c) => (await c.query('SELECT name FROM stores WHERE id = $1', [store.id])).rows[0].name as string
		);
		const bcc = address('bcc-target');
		const storeBcc = address('store-bcc-target');
		await withClient((c) =>
			c.query(`UPDATE stores SET name = $2 WHERE id = $1`, [store.id, `Test store\r\nBcc: ${storeBcc}`])
		);
		try {
			const job = await createJob({ name: `Mallory\r\nBcc: ${bcc}`, email: to, notifyEmail: true });
			await work(job);
			const [mail] = await eventually(() => mailTo(to, MAIL_DIR).length > 0 && mailTo(to, MAIL_DIR), 'the message');
			expect(mail.envelope.to).toEqual([to]);
			const lines = headerLines(mail.raw);
			expect(lines.filter((l) => /^(bcc|cc):/i.test(l))).toEqual([]);
			expect(mail.headers.map((h) => h.key)).not.toContain('bcc');
			expect(mail.headers.map((h) => h.key)).not.toContain('cc');
			// The name arrives flattened onto one line, inside the To header.
			expect(mail.to).toEqual([{ name: `Mallory Bcc: ${bcc}`, address: to }]);
			expect(mail.subject).toContain(`Test store Bcc: ${storeBcc}`);
			expect(mail.subject).not.toMatch(/[\r\n]/);
			expect(mail.text).toContain(`Hello Mallory Bcc: ${bcc},`);
			expect(lines.filter((l) => /^to:/i.test(l))).toHaveLength(1);
			expect(lines.filter((l) => /^subject:/i.test(l))).toHaveLength(1);
			await settle(600);
			expect(mailTo(bcc, MAIL_DIR)).toEqual([]);
			expect(mailTo(storeBcc, MAIL_DIR)).toEqual([]);
		} finally {
			await withClient((c) => c.query(`UPDATE stores SET name = $2 WHERE id = $1`, [store.id, storeName]));
		}
	});
});

describe('two instances sending', () => {
	it('every notice is sent once, whichever instance claims it', async () => {
		const count = 10;
		const jobs: { job: Job; to: string }[] = [];
		for (let i = 0; i < count; i++) {
			const to = address(`pair${i}`);
			jobs.push({
				job: await createJob({ name: `Pair ${i} Invented`, email: to, notifyEmail: true }, ['LF'], i % 2),
				to
			});
		}
		await Promise.all(
			[0, 1].map((via) => Promise.all(jobs.filter((_, i) => i % 2 === via).map(({ job }) => work(job, { via }))))
		);
		await eventually(() => jobs.every(({ to }) => mailTo(to, MAIL_DIR).length > 0), 'all ten messages', 20_000);
		await settle(1500);
		for (const { job, to } of jobs) {
			const mail = mailTo(to, MAIL_DIR);
			expect(mail, to).toHaveLength(1);
			expect(mail[0].subject).toContain(`job ${job.number}`);
			const [ready] = await outboxOf(job.id);
			expect(ready).toMatchObject({ kind: 'ready', attempts: 1, last_error: null });
		}
	}, 40_000);

	it('thirty notices due at the same moment are each sent once', async () => {
		const count = 30;
		const targets = Array.from({ length: count }, (_, i) => address(`burst${i}`));
		// One transaction, so both instances' loops find all thirty due at once and race for them.
		await withClient((c) =>
			c.query(
				`INSERT INTO outbox (store_id, kind, job_id, to_name, to_address, payload)
				 SELECT o.store_id, 'ready', o.job_id, 'Burst Invented', t.address, o.payload
				   FROM (SELECT * FROM outbox WHERE store_id = $1 AND kind = 'ready' ORDER BY id LIMIT 1) o,
				        unnest($2::text[]) AS t(address)`,
				[store.id, targets]
			)
		);
		await eventually(() => targets.every((to) => mailTo(to, MAIL_DIR).length > 0), 'thirty messages', 20_000);
		await settle(1500);
		for (const to of targets) expect(mailTo(to, MAIL_DIR), to).toHaveLength(1);
		const rows = await withClient(
			async (c) => (await c.query('SELECT attempts, sent_at FROM outbox WHERE to_address = ANY($1)', [targets])).rows
		);
		expect(rows).toHaveLength(count);
		expect(rows.every((r) => r.attempts === 1 && r.sent_at !== null)).toBe(true);
	}, 40_000);
});

describe('giving up', () => {
	it('a recipient the mail server refuses (550) is given up at once, with the reason', async () => {
		const to = address('refuse-me');
		const job = await createJob({ name: 'Rita Invented', email: to, notifyEmail: true });
		await work(job);
		const ready = await eventually(async () => {
			const [row] = await outboxOf(job.id);
			return row?.last_error && row;
		}, 'the refusal');
		expect(ready.last_error).toMatch(/^Gave up: the mail server refused the recipient .*550/);
		expect(ready).toMatchObject({ attempts: 1, sent_at: null });
		const due = await withClient(
			async (c) => (await c.query('SELECT isfinite(send_after) AS due FROM outbox WHERE id = $1', [ready.id])).rows[0]
		);
		expect(due).toEqual({ due: false });
		await settle(600);
		expect((await outboxOf(job.id))[0].attempts).toBe(1);
		expect(mailTo(to, MAIL_DIR)).toEqual([]);
	});

	it('a stored address that is not an address is given up without trying', async () => {
		const id = await withClient(async (c) => {
			const r = await c.query(
				`INSERT INTO outbox (store_id, kind, to_name, to_address, payload)
				 SELECT store_id, kind, 'Broken Invented', 'not-an-address, victim@example.test', payload
				   FROM outbox WHERE store_id = $1 AND kind = 'ready' ORDER BY id LIMIT 1
				 RETURNING id`,
				[store.id]
			);
			return r.rows[0].id as string;
		});
		const row = await eventually(
			() =>
				withClient(async (c) => (await c.query('SELECT * FROM outbox WHERE id = $1', [id])).rows[0]).then(
					(r) => r.last_error && r
				),
			'the give-up'
		);
		expect(row.last_error).toMatch(
			/^Gave up: the address "not-an-address, victim@example.test" is not an e-mail address/
		);
		expect(row).toMatchObject({ attempts: 1, sent_at: null });
		expect(mailTo('victim@example.test', MAIL_DIR)).toEqual([]);
	});
});

describe('service summary on request', () => {
	let job: Job;
	const to = address('summary');

	beforeAll(async () => {
		// A customer who did not opt in to notices asks for the summary at the counter.
		job = await createJob({ name: 'Sam Invented', email: to, notifyEmail: false }, ['LF', 'RF']);
	});

	it('is refused for a technician (403), before the work is done (422), and to another store (404)', async () => {
		const tech = await as.tech[0].call('POST', `/api/jobs/${job.id}/summary`, {});
		expect(tech.status).toBe(403);
		const early = await as.writer[0].call('POST', `/api/jobs/${job.id}/summary`, {});
		expect(early.status, JSON.stringify(early.body)).toBe(422);
		expect(early.body.code).toBe('job_not_done');
		const foreign = await as.otherWriter[0].call('POST', `/api/jobs/${job.id}/summary`, {});
		expect(foreign.status).toBe(404);
		// Not JSON (what a cross-site form could send): refused before anything is read.
		const form = await fetch(`${instances[0].url}/api/jobs/${job.id}/summary`, {
			method: 'POST',
			headers: { origin: instances[0].url, cookie: cookies.writer, 'content-type': 'text/plain' },
			body: '{}'
		});
		expect(form.status).toBe(415);
		expect(await outboxOf(job.id)).toEqual([]);
	});

	it('a writer’s summary is delivered with the wheel records in the store’s units', async () => {
		const lf = job.wheels.find((w) => w.position === 'LF')!;
		const saved = await as.lead[0].call('PUT', `/api/wheels/${lf.id}/record`, {
			version: 0,
			treadDepthMm: 5,
			dotCode: 'DOT U2LL LMLR 4519',
			pressureSetKpa: 240,
			torqueAppliedNm: 110,
			damage: { tire: ['puncture'], rim: ['curb rash'], puncture: { location: 'tread', diameterMm: 4 } }
		});
		expect(saved.status, JSON.stringify(saved.body)).toBe(200);
		await work(job);

		const r = await as.writer[1].call('POST', `/api/jobs/${job.id}/summary`, {});
		expect(r.status, JSON.stringify(r.body)).toBe(202);
		expect(r.body).toEqual({
			id: expect.any(Number),
			kind: 'summary',
			jobNumber: job.number,
			to: { name: 'Sam Invented', address: to }
		});

		const mail = await eventually(
			() => mailTo(to, MAIL_DIR).find((m) => /Service summary/.test(m.subject)),
			'the summary'
		);
		expect(mail.subject).toContain(`job ${job.number}`);
		// The test store shows psi, lbf·ft, inches and 32nds (the column defaults), SI beside.
		expect(mail.text).toContain('LF (left front)');
		expect(mail.text).toContain('Tread depth: 6/32 in (5.0 mm)');
		expect(mail.text).toMatch(/Tire age: made in week 45 of 2019, \d+\.\d years old/);
		expect(mail.text).toContain('Pressure set (cold): 35 psi (240 kPa)');
		expect(mail.text).toContain('Torque applied: 81 lbf·ft (110 N·m)');
		expect(mail.text).toContain(
			'Damage and repairs: tire: puncture; rim: curb rash; puncture in the tread, 0.16 in (4.0 mm) across'
		);
		expect(mail.text).toContain('RF (right front)');
		expect(mail.text).toContain('Tread depth: not recorded');
		expect(mail.html).toContain('35 psi (240 kPa)');
		expectSafeHtml(mail);
		// Only the summary: this customer did not opt in to the automatic notices.
		await settle(600);
		expect(mailTo(to, MAIL_DIR)).toHaveLength(1);
		const rows = await outboxOf(job.id);
		expect(rows.map((row) => row.kind)).toEqual(['summary']);
	});

	it('is refused when the customer has no e-mail address', async () => {
		const none = await createJob({ name: 'Nomail Invented' });
		await work(none);
		const r = await as.manager[0].call('POST', `/api/jobs/${none.id}/summary`, {});
		expect(r.status, JSON.stringify(r.body)).toBe(422);
		expect(r.body.code).toBe('no_email');
		expect(await outboxOf(none.id)).toEqual([]);
	});
});

describe('the outbox page', () => {
	it('shows a manager the store’s notices with their text, and nobody else', async () => {
		const page = await fetch(`${instances[0].url}/manage/outbox`, { headers: { cookie: cookies.manager } });
		expect(page.status).toBe(200);
		const html = await page.text();
		// The newest notices: the summary, with its text, and the refused recipient, given up.
		expect(html).toContain('service summary');
		expect(html).toContain(address('summary'));
		expect(html).toContain('Tread depth: 6/32 in (5.0 mm)');
		expect(html).toContain('✕ given up');
		expect(html).toContain('the mail server refused the recipient');
		expect(html).toContain('Mail goes to 127.0.0.1:');
		expect(html).toContain('href="/manage/outbox?before=');
		const refused = await fetch(`${instances[0].url}/manage/outbox`, { headers: { cookie: cookies.lead } });
		expect(refused.status).toBe(403);
	});
});

// Errors leak nothing, logs cannot be forged, and every response carries the security headers.
// - A forced internal error (a database trigger that raises, as a bug deep in a query would): the client gets a
//   generic sentence and a reference; the log has the details under the same id, with a UTC timestamp.
// - Input with newlines (a typed e-mail, a path) stays inside one JSON log line.
// - Headers on pages, API answers, errors, streams, exports and static files; cookies HttpOnly and SameSite, and
//   Secure when the app is served over https (ORIGIN https://…, as behind a TLS-terminating proxy).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../support/database';
import { client, logEntries, signIn, startInstances, stopInstances, type Instance } from '../support/instances';
import { createTestStore, newJob, type TestStore } from '../support/store';

let instance: Instance;
let secure: Instance;
let store: TestStore;
const marker = `force-internal-error-${process.pid}`;
const secret = `secret-detail-${process.pid}-hunter2`;
const utc = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/;

beforeAll(async () => {
	store = await createTestStore(`err-${process.pid}`);
	await withClient((c) =>
		c.query(`
			CREATE OR REPLACE FUNCTION reliability_force_error() RETURNS trigger LANGUAGE plpgsql AS $$
			BEGIN
				IF NEW.notes = '${marker}' THEN RAISE EXCEPTION '${secret} in table jobs'; END IF;
				RETURN NEW;
			END $$;
			DROP TRIGGER IF EXISTS reliability_force_error ON jobs;
			CREATE TRIGGER reliability_force_error BEFORE INSERT ON jobs FOR EACH ROW EXECUTE FUNCTION reliability_force_error();
		`)
	);
	[instance] = await startInstances([3631]);
	// The same build told it is served over https (a proxy in front terminates TLS).
	[secure] = await startInstances([3632], { ORIGIN: 'https://127.0.0.1:3632' });
}, 60_000);

afterAll(async () => {
	await withClient((c) =>
		c.query('DROP TRIGGER IF EXISTS reliability_force_error ON jobs; DROP FUNCTION IF EXISTS reliability_force_error()')
	);
	await stopInstances([instance, secure].filter(Boolean));
});

describe('an internal error', () => {
	it('answers with a generic message and a reference; the log has the details under that reference', async () => {
		const writer = client(
			instance.url,
			await signIn(instance.url, store.people.writer.email, store.people.writer.password)
		);
		const before = await withClient(async (c) => (await c.query('SELECT count(*)::int AS n FROM jobs')).rows[0].n);
		const response = await fetch(`${instance.url}/api/jobs`, {
			method: 'POST',
			headers: {
				origin: instance.url,
				cookie: await signIn(instance.url, store.people.writer.email, store.people.writer.password),
				'content-type': 'application/json'
			},
			body: JSON.stringify(newJob({ notes: marker }))
		});
		expect(response.status).toBe(500);
		const text = await response.text();
		const body = JSON.parse(text);
		expect(body.code).toBe('internal');
		expect(body.id).toMatch(/^[0-9a-f-]{36}$/);
		expect(body.message).toContain(body.id);
		expect(response.headers.get('x-request-id')).toBe(body.id);
		for (const leak of [secret, 'hunter2', 'jobs', 'trigger', 'plpgsql', 'at ', '.js', 'P0001', 'INSERT'])
			expect(text, `the answer mentions ${leak}`).not.toContain(leak);
		expect(await withClient(async (c) => (await c.query('SELECT count(*)::int AS n FROM jobs')).rows[0].n)).toBe(
			before
		);

		const entry = logEntries(instance).find((e) => e.requestId === body.id && e.level === 'error');
		expect(entry, 'the log entry under the reference').toBeDefined();
		expect(entry!.msg).toBe('internal error');
		expect(entry!.err.message).toContain(secret);
		expect(entry!.err.stack).toBeTruthy();
		expect(entry!.path).toBe('/api/jobs');
		expect(entry!.time).toMatch(utc);
		// The instance carries on.
		expect((await writer.call('GET', '/api/board')).status).toBe(200);
	});
});

describe('the log', () => {
	it('is one JSON object per line with UTC times, and input with newlines cannot add a line', async () => {
		const forged = '{"level":"info","time":"2026-01-01T00:00:00.000Z","msg":"forged entry"}';
		const before = instance.logs.length;
		for (const email of [`x@y.lugline.test\n${forged}`, `x@y.lugline.test\r\n${forged}`, `a\u2028${forged}`]) {
			const r = await fetch(`${instance.url}/signin`, {
				method: 'POST',
				headers: { origin: instance.url, 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
				body: new URLSearchParams({ email, password: 'wrong-password' }),
				redirect: 'manual'
			});
			expect([400, 429]).toContain(r.status);
		}
		await fetch(`${instance.url}/api/jobs/1%0A${encodeURIComponent(forged)}`, { headers: { origin: instance.url } });
		await new Promise((r) => setTimeout(r, 200));
		const lines = instance.logs.slice(before).filter((l) => l.trim() !== '');
		expect(lines.length).toBeGreaterThanOrEqual(4);
		for (const line of instance.logs.filter((l) => l.trim() !== '' && !l.startsWith('Listening on'))) {
			const entry = JSON.parse(line);
			expect(entry.time).toMatch(utc);
			expect(entry.msg).not.toBe('forged entry');
		}
		const attempts = logEntries(instance).filter((e) => e.msg === 'sign-in attempt');
		expect(attempts.some((e) => String(e.email).includes('\n') && String(e.email).includes('forged entry'))).toBe(true);
	});
});

function checkHeaders(response: Response, what: string) {
	const h = response.headers;
	expect(h.get('x-content-type-options'), what).toBe('nosniff');
	expect(h.get('referrer-policy'), what).toBeTruthy();
	const csp = h.get('content-security-policy') ?? '';
	expect(csp, what).toMatch(/default-src ('self'|'none')/);
	// Nothing but the app's own origin: no scheme-qualified or wildcard sources anywhere in the policy.
	expect(csp, what).not.toMatch(/https?:|\*|data:/);
	if (csp.includes("default-src 'self'")) {
		expect(csp, what).toContain("font-src 'self'");
		expect(csp, what).toContain("script-src 'self'");
	}
	expect(h.get('x-frame-options') === 'DENY' || csp.includes("frame-ancestors 'none'"), what).toBe(true);
}

describe('security headers', () => {
	it('are on every kind of response', async () => {
		const url = instance.url;
		const cookie = await signIn(url, store.people.manager.email, store.people.manager.password);
		const page = await fetch(`${url}/signin`);
		const html = await page.text();
		checkHeaders(page, 'the sign-in page');
		// Pages: SvelteKit's per-response nonce for its start-up script; no inline script without it.
		const nonce = /script-src 'self' 'nonce-([^']+)'/.exec(page.headers.get('content-security-policy')!)?.[1];
		expect(nonce).toBeTruthy();
		for (const tag of html.match(/<script\b[^>]*>/g) ?? []) {
			if (!/\bsrc=/.test(tag)) expect(tag).toContain(`nonce="${nonce}"`);
		}
		const asset = /(?:src=|href=|import\()["']\.?\/?(_app\/immutable\/[^"']+\.js)["']/.exec(html)?.[1];
		expect(asset).toBeTruthy();
		const css = /href="\.?\/?(_app\/immutable\/assets\/[^"]+\.css)"/.exec(html)?.[1];
		const responses: [string, Promise<Response>][] = [
			['a static script', fetch(`${url}/${asset}`)],
			['the favicon', fetch(`${url}/favicon.svg`)],
			['health', fetch(`${url}/api/health`)],
			['an API answer', fetch(`${url}/api/board`, { headers: { cookie } })],
			['an API refusal', fetch(`${url}/api/board`)],
			[
				'a cross-origin refusal',
				fetch(`${url}/api/jobs`, { method: 'POST', headers: { origin: 'http://evil.example' } })
			],
			['a missing page', fetch(`${url}/no-such-page`)],
			['a redirect', fetch(`${url}/`, { redirect: 'manual' })],
			['the console', fetch(`${url}/`, { headers: { cookie } })],
			['a CSV export', fetch(`${url}/api/export/vehicles.csv`, { headers: { cookie } })]
		];
		if (css) responses.push(['a stylesheet', fetch(`${url}/${css}`)]);
		for (const [what, pending] of responses) {
			const r = await pending;
			checkHeaders(r, what);
			await r.arrayBuffer();
		}
		// The event stream: headers arrive before the first event.
		const controller = new AbortController();
		const stream = await fetch(`${url}/api/events`, {
			method: 'POST',
			headers: { origin: url, cookie, 'content-type': 'application/json' },
			body: JSON.stringify({ cursor: 0 }),
			signal: controller.signal
		});
		expect(stream.status).toBe(200);
		checkHeaders(stream, 'the event stream');
		controller.abort();
		// Fonts are bundled and served from the app (the stylesheet names no other origin).
		if (css) expect(await (await fetch(`${url}/${css}`)).text()).not.toMatch(/url\(\s*["']?(https?:)?\/\//);
	});

	it('session cookies are HttpOnly and SameSite, and Secure when served over https', async () => {
		const signInAt = async (url: string, origin: string) => {
			const r = await fetch(`${url}/signin`, {
				method: 'POST',
				headers: { origin, 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
				body: new URLSearchParams({ email: store.people.lead.email, password: store.people.lead.password }),
				redirect: 'manual'
			});
			expect(r.status).toBe(303);
			return r.headers.getSetCookie().find((c) => /session-token=/.test(c))!;
		};
		const plain = await signInAt(instance.url, instance.url);
		expect(plain).toMatch(/^authjs\.session-token=/);
		expect(plain).toMatch(/;\s*HttpOnly/i);
		expect(plain).toMatch(/;\s*SameSite=Lax/i);
		const overHttps = await signInAt(secure.url, 'https://127.0.0.1:3632');
		expect(overHttps).toMatch(/^__Secure-authjs\.session-token=/);
		expect(overHttps).toMatch(/;\s*Secure/i);
		expect(overHttps).toMatch(/;\s*HttpOnly/i);
		expect(overHttps).toMatch(/;\s*SameSite=Lax/i);
		const hsts = (await fetch(`${secure.url}/api/health`)).headers.get('strict-transport-security');
		expect(hsts).toMatch(/max-age=\d{7,}/);
		expect((await fetch(`${instance.url}/api/health`)).headers.get('strict-transport-security')).toBeNull();
		// And the https instance's own origin check: the plain origin is foreign to it.
		const foreign = await fetch(`${secure.url}/signin`, {
			method: 'POST',
			headers: { origin: secure.url, 'content-type': 'application/x-www-form-urlencoded' },
			body: new URLSearchParams({ email: store.people.lead.email, password: store.people.lead.password }),
			redirect: 'manual'
		});
		expect(foreign.status).toBe(403);
	});
});

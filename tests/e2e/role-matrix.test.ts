// Every entry of the authorisation table, asked by every role and by nobody: allowed cells answer, the others get
// 401/403, and signed-out page loads are sent to sign-in. (src/lib/server/authz.test.ts checks that the table lists
// every route file.)
import { expect, request, test, type APIRequestContext } from '@playwright/test';
import { allows, authorisation, type Access } from '../../src/lib/server/authz';
import { roles, type Role } from '../../src/lib/roles';
import { account } from '../support/accounts';

/** Concrete addresses for route ids; ids with parameters need an example here or the test fails. */
const examples: Record<string, string> = {
	// Demo job 1 and wheel 1 exist in the seeded store of every role in this matrix.
	'/api/jobs/[id=id]': '/api/jobs/1',
	// Roles allowed get 202 (a summary queued for the tests' mail catcher) or 422 (job 1 not done, no address, or a
	// summary already waiting); never 401/403.
	'/api/jobs/[id=id]/summary': '/api/jobs/1/summary',
	'/api/wheels/[id=id]': '/api/wheels/1',
	'/api/vehicles/[id=id]': '/api/vehicles/1',
	'/api/wheels/[id=id]/record': '/api/wheels/1/record',
	// Roles allowed get 415 (the matrix posts JSON, not a photo); the demo store has no photos, so photo 1 is a 404.
	'/api/wheels/[id=id]/photos': '/api/wheels/1/photos',
	'/api/photos/[id=id]': '/api/photos/1',
	'/api/bays/[code=code]/claim': '/api/bays/B1/claim',
	'/(staff)/bay/[code=code]': '/bay/B1',
	// Vehicle 1 is the seed's first record; a manager's empty save is refused (400) and changes nothing.
	'/(staff)/manage/vehicles/[id=id]': '/manage/vehicles/1',
	// A manager gets the day's throughput as CSV (200).
	'/api/reports/[name]': '/api/reports/throughput?from=2026-12-01&to=2026-12-02'
};

function urlFor(routeId: string): string {
	if (examples[routeId]) return examples[routeId];
	if (routeId.includes('[')) throw new Error(`add an example address for ${routeId} to tests/e2e/role-matrix.test.ts`);
	return routeId.replace(/\/\([^)]+\)/g, '') || '/';
}

const baseURL = `http://127.0.0.1:${process.env.E2E_PORT ?? 3100}`;

async function contextFor(role: Role | 'nobody'): Promise<APIRequestContext> {
	const context = await request.newContext({ baseURL, extraHTTPHeaders: { origin: baseURL, accept: 'text/html' } });
	if (role === 'nobody') return context;
	const { email, password } = account(role);
	const response = await context.post('/signin', { form: { email, password, redirectTo: '/' }, maxRedirects: 0 });
	expect(response.status(), `${role} signs in`).toBe(303);
	return context;
}

function expectation(access: Access, who: Role | 'nobody') {
	return allows(access, who === 'nobody' ? undefined : who);
}

for (const who of [...roles, 'nobody'] as const) {
	test(`the authorisation table holds for ${who}`, async () => {
		const context = await contextFor(who);
		const deferred: (() => Promise<void>)[] = [];
		for (const [routeId, rule] of Object.entries(authorisation)) {
			const url = urlFor(routeId);
			if (rule.kind === 'api') {
				for (const [method, access] of Object.entries(rule.methods)) {
					const response = await context.fetch(url, {
						method,
						maxRedirects: 0,
						data: method === 'GET' ? undefined : {}
					});
					const status = response.status();
					const label = `${who} ${method} ${url} → ${status}`;
					if (expectation(access, who)) expect([401, 403], label).not.toContain(status);
					else expect(status, label).toBe(who === 'nobody' ? 401 : 403);
				}
				continue;
			}
			const page = await context.get(url, { maxRedirects: 0 });
			const label = `${who} GET ${url} → ${page.status()}`;
			if (expectation(rule.load, who)) {
				// Allowed: the page itself, or (the sign-in page for someone signed in) a redirect onwards, never to sign-in.
				expect([200, 303], label).toContain(page.status());
				if (page.status() === 303) expect(page.headers()['location'], label).not.toMatch(/^\/signin/);
			} else if (who === 'nobody') {
				expect(page.status(), label).toBe(303);
				expect(page.headers()['location'], label).toMatch(/^\/signin\?redirectTo=/);
			} else expect(page.status(), label).toBe(403);

			for (const [action, access] of Object.entries(rule.actions ?? {})) {
				const check = async () => {
					const target = action === 'default' ? url : `${url}?/${action}`;
					const response = await context.post(target, { form: {}, maxRedirects: 0 });
					const status = response.status();
					const actionLabel = `${who} POST ${target} → ${status}`;
					if (expectation(access, who)) expect([401, 403], actionLabel).not.toContain(status);
					else expect(status, actionLabel).toBe(who === 'nobody' ? 401 : 403);
				};
				// Signing out ends the session the rest of the matrix needs, so it goes last.
				if (routeId === '/signout') deferred.push(check);
				else await check();
			}
		}
		for (const check of deferred) await check();
		await context.dispose();
	});
}

test('a form action posted from a foreign origin is refused', async () => {
	const context = await request.newContext({
		baseURL,
		extraHTTPHeaders: { origin: 'http://evil.example', accept: 'text/html' }
	});
	const { email, password } = account('manager');
	const response = await context.post('/signin', { form: { email, password }, maxRedirects: 0 });
	expect(response.status()).toBe(403);
	expect(response.headers()['set-cookie'] ?? '').not.toContain('authjs.session-token');
	await context.dispose();
});

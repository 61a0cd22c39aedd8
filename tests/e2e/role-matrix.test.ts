// Every entry of the authorisation table, asked by every role and by nobody: allowed cells answer, the others get
// 401/403, and signed-out page loads are sent to sign-in. (src/lib/server/authz.test.ts checks that the table lists
// every route file.)
import { expect, request, test, type APIRequestContext } from '@playwright/test';
import { allows, authorisation, type Access } from '../../src/lib/server/authz';
import { roles, type Role } from '../../src/lib/roles';
import { account } from '../support/accounts';
import { urlFor } from '../support/routes';

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

// Every page, form action and API method under src/routes must have an entry in the authorisation table, and
// the table must not list what does not exist. The end-to-end role matrix (tests/e2e/role-matrix.test.ts) then
// checks each entry against each role on the running app.
import { describe, expect, it } from 'vitest';
import { allows, authorisation, ruleFor } from './authz';

interface FoundRoute {
	id: string;
	page: boolean;
	actions: string[];
	methods: string[];
}

// Vite finds every route file, so a new route cannot slip past this test. The server modules are imported for real
// to read their exported actions and methods; page components are only listed, never imported.
const pageFiles = import.meta.glob('/src/routes/**/+page.svelte');
const serverModules = import.meta.glob('/src/routes/**/+{page.server,server}.ts');

/** SvelteKit's route id is the folder path under src/routes. */
const routeId = (file: string) => file.replace(/^\/src\/routes/, '').replace(/\/[^/]+$/, '') || '/';

async function walk(): Promise<Map<string, FoundRoute>> {
	const found = new Map<string, FoundRoute>();
	const entry = (id: string) => found.get(id) ?? found.set(id, { id, page: false, actions: [], methods: [] }).get(id)!;
	for (const file of Object.keys(pageFiles)) entry(routeId(file)).page = true;
	for (const [file, load] of Object.entries(serverModules)) {
		const mod = (await load()) as Record<string, unknown>;
		const route = entry(routeId(file));
		if (file.endsWith('+page.server.ts')) {
			route.page = true;
			route.actions = Object.keys((mod.actions as object | undefined) ?? {});
		} else {
			route.methods = Object.keys(mod).filter((k) => /^(GET|HEAD|POST|PUT|PATCH|DELETE|OPTIONS|fallback)$/.test(k));
		}
	}
	return found;
}

const found = await walk();

describe('the authorisation table covers every route', () => {
	it('finds the route files (the walker itself works)', () => {
		expect(found.get('/signin')?.actions).toEqual(['default']);
		expect(found.get('/api/health')?.methods).toEqual(['GET']);
	});

	for (const route of found.values()) {
		it(`${route.id} is listed with every action and method`, () => {
			const rule = authorisation[route.id];
			expect(rule, `add '${route.id}' to src/lib/server/authz.ts`).toBeDefined();
			if (route.page) {
				expect(rule.kind).toBe('page');
				const listed = rule.kind === 'page' ? Object.keys(rule.actions ?? {}) : [];
				expect(listed.sort(), `actions of ${route.id}`).toEqual([...route.actions].sort());
			}
			if (route.methods.length) {
				expect(rule.kind).toBe('api');
				expect(route.methods, 'a catch-all `fallback` handler cannot be authorised per method').not.toContain(
					'fallback'
				);
				const listed = rule.kind === 'api' ? Object.keys(rule.methods) : [];
				expect(listed.sort(), `methods of ${route.id}`).toEqual([...route.methods].sort());
			}
		});
	}

	it('lists nothing that does not exist', () => {
		expect(Object.keys(authorisation).filter((id) => !found.has(id))).toEqual([]);
	});
});

describe('ruleFor', () => {
	it('refuses a route id that is not in the table', () => {
		expect(ruleFor('/nowhere', 'GET', '')).toEqual({ refused: 'unlisted' });
	});
	it('refuses an unlisted method or action of a listed route', () => {
		expect(ruleFor('/api/health', 'POST', '')).toEqual({ refused: 'unlisted' });
		expect(ruleFor('/signin', 'POST', '?/other')).toEqual({ refused: 'unlisted' });
		expect(ruleFor('/signin', 'DELETE', '')).toEqual({ refused: 'unlisted' });
	});
	it('reads the action name from ?/name and treats a bare POST as the default action', () => {
		expect(ruleFor('/signin', 'POST', '')).toEqual({ access: 'public' });
		expect(ruleFor('/signout', 'POST', '?/default')).toEqual({ access: 'staff' });
	});
	it('lets only managers into manage pages', () => {
		const decision = ruleFor('/(staff)/manage', 'GET', '');
		if (!('access' in decision)) throw new Error('manage must be listed');
		expect(allows(decision.access, 'manager')).toBe(true);
		for (const role of ['writer', 'lead', 'tech'] as const) expect(allows(decision.access, role)).toBe(false);
		expect(allows(decision.access, undefined)).toBe(false);
	});
	it('treats staff access as any signed-in role, and nobody signed out', () => {
		for (const role of ['writer', 'lead', 'tech', 'manager'] as const) expect(allows('staff', role)).toBe(true);
		expect(allows('staff', undefined)).toBe(false);
		expect(allows('public', undefined)).toBe(true);
	});
});

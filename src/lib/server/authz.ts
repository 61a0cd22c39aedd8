// The one authorisation table: every page, form action and API method by SvelteKit route id, with the roles that
// may use it. hooks.server.ts checks it on every request; anything not listed here is refused. The role-matrix
// test walks src/routes and fails when a route, action or method is missing from this table.
// Relative import: the end-to-end role matrix imports this table outside Vite.
import { roles, type Role } from '../roles';

export type Access = 'public' | 'staff' | readonly Role[];

export interface PageRule {
	kind: 'page';
	/** GET of the page and its data. */
	load: Access;
	/** Named form actions (`default` for the unnamed one). */
	actions?: Record<string, Access>;
}

export interface ApiRule {
	kind: 'api';
	methods: Partial<Record<'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE', Access>>;
}

export type Rule = PageRule | ApiRule;

const managers = ['manager'] as const satisfies readonly Role[];
const counter = ['writer', 'lead', 'manager'] as const satisfies readonly Role[];
const floorHands = ['lead', 'tech', 'manager'] as const satisfies readonly Role[];
const leadsOnly = ['lead', 'manager'] as const satisfies readonly Role[];

export const authorisation: Record<string, Rule> = {
	'/signin': { kind: 'page', load: 'public', actions: { default: 'public' } },
	'/signout': { kind: 'page', load: 'staff', actions: { default: 'staff' } },
	'/(staff)': { kind: 'page', load: 'staff' },
	// Staff, bays, services and store settings: each change a named form action (src/lib/server/db/{staff,bays,…}.ts).
	'/(staff)/manage': {
		kind: 'page',
		load: managers,
		actions: {
			add: managers,
			role: managers,
			disable: managers,
			enable: managers,
			password: managers,
			pin: managers
		}
	},
	'/(staff)/manage/bays': {
		kind: 'page',
		load: managers,
		actions: { add: managers, rename: managers, up: managers, down: managers, out: managers, in: managers }
	},
	'/(staff)/manage/services': { kind: 'page', load: managers, actions: { add: managers, save: managers } },
	'/(staff)/manage/settings': { kind: 'page', load: managers, actions: { save: managers } },
	// Vehicle data (shared by the chain's stores): list and search, edit one record, import a CSV file; exports.
	'/(staff)/manage/vehicles': { kind: 'page', load: managers },
	'/(staff)/manage/vehicles/[id=id]': { kind: 'page', load: managers, actions: { save: managers } },
	'/(staff)/manage/vehicles/import': {
		kind: 'page',
		load: managers,
		actions: { preview: managers, import: managers }
	},
	'/api/export/vehicles.csv': { kind: 'api', methods: { GET: managers } },
	'/api/export/jobs.csv': { kind: 'api', methods: { GET: managers } },
	'/api/export/wheel-records.csv': { kind: 'api', methods: { GET: managers } },
	'/(staff)/manage/outbox': { kind: 'page', load: managers },
	// Reports (src/lib/server/db/reports.ts): the page and one CSV per report.
	'/(staff)/manage/reports': { kind: 'page', load: managers },
	'/api/reports/[name]': { kind: 'api', methods: { GET: managers } },
	'/api/health': { kind: 'api', methods: { GET: 'public' } },
	'/api/me': { kind: 'api', methods: { GET: 'staff' } },
	'/api/board': { kind: 'api', methods: { GET: 'staff' } },
	'/api/customers': { kind: 'api', methods: { GET: 'staff' } },
	'/api/vehicles': { kind: 'api', methods: { GET: 'staff' } },
	'/api/vehicles/[id=id]': { kind: 'api', methods: { GET: 'staff' } },
	'/api/events': { kind: 'api', methods: { POST: 'staff' } },
	'/api/jobs': { kind: 'api', methods: { POST: counter } },
	'/api/jobs/[id=id]': { kind: 'api', methods: { GET: 'staff', PATCH: counter } },
	// A service-summary e-mail to the job's customer: the counter's call (src/lib/server/mail/outbox.ts).
	'/api/jobs/[id=id]/summary': { kind: 'api', methods: { POST: counter } },
	// Finer rules inside (a technician only in their own bay): src/lib/server/db/wheels.ts.
	'/api/wheels/[id=id]': { kind: 'api', methods: { PATCH: floorHands } },
	'/api/wheels/move': { kind: 'api', methods: { POST: leadsOnly } },
	// Finer rules inside (a technician only for wheels of their bay): src/lib/server/db/records.ts.
	'/api/wheels/[id=id]/record': { kind: 'api', methods: { GET: 'staff', PUT: floorHands } },
	// Every staff member of the store sees the photos; finer rules for adding them (a technician only for wheels of
	// their bay or that they worked): src/lib/server/db/photos.ts.
	'/api/wheels/[id=id]/photos': { kind: 'api', methods: { GET: 'staff', POST: floorHands } },
	'/api/photos/[id=id]': { kind: 'api', methods: { GET: 'staff' } },
	// Any signed-in screen may be claimed; the PIN decides who (src/lib/server/db/claims.ts).
	'/api/bays/[code=code]/claim': { kind: 'api', methods: { POST: 'staff', DELETE: 'staff' } },
	'/(staff)/bay/[code=code]': { kind: 'page', load: 'staff' }
};

export function allows(access: Access, role: Role | undefined): boolean {
	if (access === 'public') return true;
	if (!role) return false;
	if (access === 'staff') return roles.includes(role);
	return access.includes(role);
}

export type Decision = { access: Access } | { refused: 'unlisted' };

/** The access rule for one request, or why there is none. */
export function ruleFor(routeId: string, method: string, search: string): Decision {
	const rule = authorisation[routeId];
	if (!rule) return { refused: 'unlisted' };
	if (rule.kind === 'api') {
		const access = rule.methods[(method === 'HEAD' ? 'GET' : method) as keyof ApiRule['methods']];
		return access ? { access } : { refused: 'unlisted' };
	}
	if (method === 'GET' || method === 'HEAD') return { access: rule.load };
	if (method !== 'POST') return { refused: 'unlisted' };
	// A form action is addressed as `?/name`; a bare POST is the default action.
	const name = [...new URLSearchParams(search).keys()].find((k) => k.startsWith('/'))?.slice(1) || 'default';
	const access = rule.actions?.[name];
	return access ? { access } : { refused: 'unlisted' };
}

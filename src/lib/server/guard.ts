// Helpers for loads and endpoints behind the authorisation hook.
import { error } from '@sveltejs/kit';
import type { StaffSession } from './auth';
import type { Actor } from './db/actor';
import { isDatabaseUnavailable } from './db';

/** The signed-in staff member. The hook has already checked the route's roles; this only narrows the type. */
export function staffOf(locals: App.Locals): StaffSession {
	if (!locals.staff) error(401, 'Sign in first.');
	return locals.staff;
}

/** The acting user of an API request, as the domain modules take it. */
export function actorOf(locals: App.Locals): Actor {
	const { userId, storeId, role } = staffOf(locals);
	// On a claimed bay screen the person who claimed it acts (hooks.server.ts checked the claim and the role).
	if (locals.claim) return { userId: locals.claim.userId, storeId, role: locals.claim.role };
	return { userId, storeId, role };
}

/** Runs a read for a page and turns a database outage into a 503 the page can explain, not a 500. */
export async function orUnavailable<T>(work: () => Promise<T>): Promise<T> {
	try {
		return await work();
	} catch (e) {
		if (isDatabaseUnavailable(e)) error(503, 'The database is not answering. Try again in a few seconds.');
		throw e;
	}
}

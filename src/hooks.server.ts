// Authentication once (Auth.js), then authorisation for every page load, form action and API route from the one
// table in $lib/server/authz. Nothing reaches a route without passing both.
import { error, json, redirect, type Handle, type HandleServerError, type ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { apiSession, authHandle, type StaffSession } from '$lib/server/auth';
import { allows, ruleFor } from '$lib/server/authz';
import { close as closeDatabase, isDatabaseUnavailable } from '$lib/server/db';
import * as claims from '$lib/server/db/claims';
import { CLAIM_HEADER } from '$lib/schemas/bay';
import { stop as stopListener } from '$lib/server/live/listener';
import * as mailSender from '$lib/server/mail/sender';

const isApi = (pathname: string) => pathname.startsWith('/api/');

function refuse(pathname: string, status: 401 | 403 | 503, message: string, code: string) {
	if (isApi(pathname))
		return json({ code, message }, { status, headers: status === 503 ? { 'Retry-After': '5' } : {} });
	return new Response(message, { status, headers: { 'content-type': 'text/plain; charset=utf-8' } });
}

const authorise: Handle = async ({ event, resolve }) => {
	const { route, request, url } = event;
	// No route matched: SvelteKit answers 404 itself.
	if (!route.id) return resolve(event);

	const decision = ruleFor(route.id, request.method, url.search);
	if ('refused' in decision) {
		return refuse(url.pathname, 403, 'This address is not open to anyone.', 'not_listed');
	}
	if (decision.access === 'public') return resolve(event);

	let staff: StaffSession | undefined;
	try {
		if (isApi(url.pathname)) {
			staff = (await apiSession(request, url.protocol === 'https:')) ?? undefined;
		} else {
			const session = (await event.locals.auth()) as { staff?: StaffSession } | null;
			staff = session?.staff;
		}
	} catch (e) {
		if (isDatabaseUnavailable(e))
			return refuse(
				url.pathname,
				503,
				'The database is not answering. Try again in a few seconds.',
				'database_unavailable'
			);
		throw e;
	}
	if (!staff) {
		if (isApi(url.pathname) || request.method !== 'GET')
			return refuse(url.pathname, 401, 'Sign in first.', 'signed_out');
		redirect(303, `/signin?redirectTo=${encodeURIComponent(url.pathname + url.search)}`);
	}
	if (staff.unverified) {
		return refuse(
			url.pathname,
			503,
			'The database is not answering. Try again in a few seconds.',
			'database_unavailable'
		);
	}
	if (!allows(decision.access, staff.role)) {
		if (isApi(url.pathname) || request.method !== 'GET') {
			return refuse(url.pathname, 403, 'Your role may not do this.', 'forbidden');
		}
		error(403, 'Your role may not open this page.');
	}
	event.locals.staff = staff;

	// A claimed bay screen acts as the person who claimed it (src/lib/server/db/claims.ts), within that person's role.
	const token = isApi(url.pathname) ? request.headers.get(CLAIM_HEADER) : null;
	if (token) {
		let claim: claims.Claim | undefined;
		try {
			claim = await claims.resolve(staff.storeId, token);
		} catch (e) {
			if (isDatabaseUnavailable(e))
				return refuse(
					url.pathname,
					503,
					'The database is not answering. Try again in a few seconds.',
					'database_unavailable'
				);
			throw e;
		}
		if (!claim)
			return refuse(
				url.pathname,
				401,
				'This bay screen is no longer claimed. Claim it again with your PIN.',
				'claim_ended'
			);
		if (!allows(decision.access, claim.role))
			return refuse(url.pathname, 403, `${claim.name}'s role may not do this.`, 'forbidden');
		event.locals.claim = claim;
	}
	return resolve(event);
};

export const handle = sequence(authHandle, authorise);

// Once per instance, before the first request: the outbox sender loop (src/lib/server/mail/sender.ts). It only
// schedules its first pass, so a database or mail server that is down does not stop the app from starting.
export const init: ServerInit = () => {
	mailSender.start();
};

// adapter-node emits this once the HTTP server has closed (Ctrl+C, SIGTERM): stop the sender (it finishes the
// notice in hand) and the listener, then release the database connections.
process.on('sveltekit:shutdown', () => {
	void Promise.allSettled([stopListener(), mailSender.stop()]).finally(() => closeDatabase());
});

export const handleError: HandleServerError = ({ error: e, status, message }) => {
	if (isDatabaseUnavailable(e))
		return { message: 'The database is not answering. Try again in a few seconds.', code: 'database_unavailable' };
	if (status >= 500) console.error(e);
	return { message, code: status === 404 ? 'not_found' : 'internal' };
};

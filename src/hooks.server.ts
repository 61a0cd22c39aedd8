// Authentication once (Auth.js), then authorisation for every page load, form action and API route from the one
// table in $lib/server/authz. Nothing reaches a route without passing both.
import { randomUUID } from 'node:crypto';
import { error, json, redirect, type Handle, type HandleServerError, type ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { apiSession, authHandle, type StaffSession } from '$lib/server/auth';
import { allows, ruleFor } from '$lib/server/authz';
import { close as closeDatabase, isDatabaseUnavailable, shouldShed } from '$lib/server/db';
import * as claims from '$lib/server/db/claims';
import { CLAIM_HEADER } from '$lib/schemas/bay';
import { stop as stopListener } from '$lib/server/live/listener';
import * as mailSender from '$lib/server/mail/sender';
import { errorDetails, log } from '$lib/server/log';
import { migrateOnStart } from '$lib/server/db/migrate';

const isApi = (pathname: string) => pathname.startsWith('/api/');

/**
 * A refusal from the hooks: `{ code, message, issues }` for the API and for callers that ask for JSON (a form
 * posted by `enhance`), plain text otherwise.
 */
function refuse(request: Request, url: URL, status: number, code: string, message: string): Response {
	const headers: Record<string, string> = status === 503 ? { 'retry-after': code === 'busy' ? '1' : '5' } : {};
	if (isApi(url.pathname) || /application\/json/i.test(request.headers.get('accept') ?? ''))
		return json({ code, message, issues: [] }, { status, headers });
	return new Response(message, { status, headers: { ...headers, 'content-type': 'text/plain; charset=utf-8' } });
}

const unavailable = (request: Request, url: URL) =>
	refuse(request, url, 503, 'database_unavailable', 'The database is not answering. Try again in a few seconds.');

const mutating = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * First for every request: a request id (sent back as `x-request-id` and quoted in error pages and the log), and
 * cross-site request forgery refused for every method that changes something. SvelteKit's own check covers form
 * posts only; a JSON or multipart call, or one without an Origin at all, must also come from the app's own pages
 * (browsers send Origin with every such request). Auth.js's own HTTP endpoints are closed: sign-in and sign-out go
 * through our form actions, which call Auth.js in-process.
 */
const guard: Handle = async ({ event, resolve }) => {
	const requestId = randomUUID();
	event.locals.requestId = requestId;
	const { request, url } = event;
	const answer = (status: number, code: string, message: string) => refuse(request, url, status, code, message);
	let response: Response;
	if (url.pathname === '/auth' || url.pathname.startsWith('/auth/')) {
		response = answer(404, 'not_found', 'Not found.');
	} else if (mutating.has(request.method) && request.headers.get('origin') !== url.origin) {
		log.warn(
			{ requestId, method: request.method, path: url.pathname, origin: request.headers.get('origin') },
			'cross-origin request refused'
		);
		response = answer(
			403,
			'cross_origin',
			'This change must come from Lugline’s own pages: the request’s Origin is missing or foreign.'
		);
	} else if (
		request.method === 'POST' &&
		!isApi(url.pathname) &&
		!/^(application\/x-www-form-urlencoded|multipart\/form-data)\s*(;|$)/i.test(
			request.headers.get('content-type') ?? ''
		)
	) {
		// Form actions read form data; SvelteKit lets text/plain through as a form type, which then cannot be read.
		response = answer(
			415,
			'unsupported_media_type',
			'Send the form as a form (application/x-www-form-urlencoded or multipart/form-data).'
		);
	} else if (isApi(url.pathname) && url.pathname !== '/api/health' && shouldShed()) {
		// Load shedding after a database outage (src/lib/server/db/index.ts, shouldShed): the screen retries.
		response = answer(503, 'busy', 'Lugline is catching up after a database hiccup. Try again in a moment.');
	} else {
		response = await resolve(event);
	}
	// A body nobody read (refused before reading, or by a route that takes none) is read to its end before the
	// answer goes out: answering while the client is still sending makes Node reset the connection, and the client
	// sees a network error instead of the 4xx. adapter-node still stops at BODY_SIZE_LIMIT.
	if (request.body && !request.bodyUsed) await request.arrayBuffer().catch(() => undefined);
	try {
		response.headers.set('x-request-id', requestId);
	} catch {
		// a response with immutable headers keeps its own
	}
	if (response.status >= 400 && response.status < 500) {
		// Denials and refusals: who asked for what (never query strings or bodies, which can hold customers' details).
		const staff = event.locals.staff;
		log[response.status === 401 || response.status === 403 ? 'warn' : 'info'](
			{
				requestId,
				method: request.method,
				path: url.pathname,
				status: response.status,
				userId: staff?.userId,
				storeId: staff?.storeId,
				role: staff?.role,
				claimedBy: event.locals.claim?.userId
			},
			'request refused'
		);
	}
	return response;
};

const authorise: Handle = async ({ event, resolve }) => {
	const { route, request, url } = event;
	// No route matched: SvelteKit answers 404 itself.
	if (!route.id) return resolve(event);

	const decision = ruleFor(route.id, request.method, url.search);
	if ('refused' in decision) {
		return refuse(request, url, 403, 'not_listed', 'This address is not open to anyone.');
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
		if (isDatabaseUnavailable(e)) return unavailable(request, url);
		throw e;
	}
	if (!staff) {
		if (isApi(url.pathname) || request.method !== 'GET')
			return refuse(request, url, 401, 'signed_out', 'Sign in first.');
		redirect(303, `/signin?redirectTo=${encodeURIComponent(url.pathname + url.search)}`);
	}
	if (staff.unverified) {
		return unavailable(request, url);
	}
	if (!allows(decision.access, staff.role)) {
		if (isApi(url.pathname) || request.method !== 'GET') {
			return refuse(request, url, 403, 'forbidden', 'Your role may not do this.');
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
			if (isDatabaseUnavailable(e)) return unavailable(request, url);
			throw e;
		}
		if (!claim)
			return refuse(
				request,
				url,
				401,
				'claim_ended',
				'This bay screen is no longer claimed. Claim it again with your PIN.'
			);
		if (!allows(decision.access, claim.role))
			return refuse(request, url, 403, 'forbidden', `${claim.name}'s role may not do this.`);
		event.locals.claim = claim;
	}
	return resolve(event);
};

export const handle = sequence(guard, authHandle, authorise);

// Once per instance, before the first request: the outbox sender loop (src/lib/server/mail/sender.ts). It only
// schedules its first pass, so a database or mail server that is down does not stop the app from starting.
export const init: ServerInit = async () => {
	await migrateOnStart();
	mailSender.start();
};

// adapter-node emits this once the HTTP server has closed (Ctrl+C, SIGTERM): stop the sender (it finishes the
// notice in hand) and the listener, then release the database connections.
process.on('sveltekit:shutdown', () => {
	void Promise.allSettled([stopListener(), mailSender.stop()]).finally(() => closeDatabase());
});

// What a client sees of an unexpected error: a generic sentence and the request id. The details (message, stack,
// route) go to the log under the same id.
export const handleError: HandleServerError = ({ error: e, event, status, message }) => {
	const requestId = event.locals.requestId ?? randomUUID();
	if (isDatabaseUnavailable(e))
		return {
			message: 'The database is not answering. Try again in a few seconds.',
			code: 'database_unavailable',
			issues: []
		};
	if (status >= 500) {
		log.error(
			{
				requestId,
				method: event.request.method,
				path: event.url.pathname,
				route: event.route.id,
				err: errorDetails(e)
			},
			'internal error'
		);
		return {
			message: `Something went wrong on our side and nothing more is shown here. Reference: ${requestId}`,
			code: 'internal',
			id: requestId,
			issues: []
		};
	}
	return { message, code: status === 404 ? 'not_found' : 'internal', issues: [] };
};

// The shape every JSON endpoint shares: checked content type, zod-validated bodies, and errors as
// `{ code, message, issues? }` with a 4xx (or 503 while the database is away), never a 500 for bad input.
import { json, type RequestEvent } from '@sveltejs/kit';
import type { z } from 'zod';
import { isDatabaseUnavailable } from './db';
import { Forbidden, NotAllowedNow, NotFound, VersionConflict } from './errors';
import { errorDetails, log } from './log';

/** JSON bodies are small (a job with its notes is a few KB); more than this is refused before it is parsed. */
export const JSON_BODY_LIMIT = 1024 * 1024;

export interface ApiIssue {
	path: string;
	message: string;
}

export class ApiError extends Error {
	constructor(
		readonly status: number,
		readonly code: string,
		message: string,
		readonly issues?: ApiIssue[],
		readonly headers: Record<string, string> = {}
	) {
		super(message);
	}
}

/** Every error answer: `{ code, message, issues }` (issues empty when no field is to blame), plus any extra. */
export function problem(status: number, code: string, message: string, extra: Record<string, unknown> = {}) {
	return json({ code, message, issues: [], ...extra }, { status });
}

function issuesOf(error: z.ZodError): ApiIssue[] {
	return error.issues.map((i) => ({ path: i.path.join('.') || '(body)', message: i.message }));
}

/** Parses a JSON body against a schema; refuses other content types (415) and malformed JSON (400). */
export async function readJson<T extends z.ZodType>(request: Request, schema: T): Promise<z.infer<T>> {
	const type = request.headers.get('content-type') ?? '';
	if (!/^application\/json\s*(;|$)/i.test(type)) {
		throw new ApiError(
			415,
			'unsupported_media_type',
			'Send the request body as JSON (Content-Type: application/json).'
		);
	}
	const declared = Number(request.headers.get('content-length') ?? 0);
	if (declared > JSON_BODY_LIMIT) throw tooLarge();
	let text: string;
	try {
		text = await request.text();
	} catch (e) {
		// adapter-node stops reading past BODY_SIZE_LIMIT (a chunked body has no length to check first).
		if (e instanceof Error && /body.*(limit|large)|content-length/i.test(e.message)) throw tooLarge();
		throw new ApiError(400, 'unreadable_body', 'The request body could not be read.');
	}
	if (Buffer.byteLength(text) > JSON_BODY_LIMIT) throw tooLarge();
	let body: unknown;
	try {
		body = JSON.parse(text);
	} catch {
		throw new ApiError(400, 'invalid_json', 'The request body is not valid JSON.');
	}
	return parse(schema, body);
}

function tooLarge() {
	return new ApiError(413, 'too_large', `The request body is too large (JSON bodies may be up to 1 MiB).`);
}

export const NUL_MESSAGE = 'Text may not contain NUL (\\0) characters.';

/**
 * The path of the first string (value or key) holding a NUL character, which PostgreSQL cannot store in text, or
 * null. Walks with its own stack: a body nested thousands deep must not overflow the call stack.
 */
export function findNul(value: unknown): string | null {
	const stack: [unknown, string][] = [[value, '']];
	while (stack.length > 0) {
		const [v, path] = stack.pop()!;
		if (typeof v === 'string') {
			if (v.includes('\u0000')) return path || '(body)';
		} else if (v && typeof v === 'object') {
			for (const [k, child] of Object.entries(v)) {
				const at = path ? `${path}.${k}` : k;
				if (k.includes('\u0000')) return at;
				stack.push([child, at]);
			}
		}
	}
	return null;
}

export function parse<T extends z.ZodType>(schema: T, value: unknown): z.infer<T> {
	const nul = findNul(value);
	if (nul !== null) {
		throw new ApiError(400, 'invalid_input', `Check ${nul}: ${NUL_MESSAGE}`, [{ path: nul, message: NUL_MESSAGE }]);
	}
	const parsed = schema.safeParse(value);
	if (!parsed.success) {
		const issues = issuesOf(parsed.error);
		throw new ApiError(
			400,
			'invalid_input',
			`Check ${issues.map((i) => i.path).join(', ')}: ${issues[0].message}`,
			issues
		);
	}
	return parsed.data;
}

/** Runs an endpoint body and maps what it throws to the API's error shape. */
export async function respond(work: () => Promise<Response>): Promise<Response> {
	try {
		return await work();
	} catch (e) {
		if (e instanceof ApiError) {
			const response = problem(e.status, e.code, e.message, { issues: e.issues ?? [] });
			for (const [name, value] of Object.entries(e.headers)) response.headers.set(name, value);
			return response;
		}
		if (e instanceof VersionConflict) return problem(409, 'version_conflict', e.message, { current: e.current });
		if (e instanceof NotFound) return problem(404, 'not_found', e.message || 'Not found.');
		if (e instanceof Forbidden) return problem(403, 'forbidden', e.message || 'Your role may not do this.');
		if (e instanceof NotAllowedNow) return problem(422, e.code, e.message);
		if (isDatabaseUnavailable(e)) {
			return json(
				{
					code: 'database_unavailable',
					message: 'The database is not answering. Try again in a few seconds.',
					issues: []
				},
				{ status: 503, headers: { 'retry-after': '5' } }
			);
		}
		const refusal = databaseRefusal(e);
		if (refusal) return problem(refusal.status, refusal.code, refusal.message);
		throw e;
	}
}

/**
 * PostgreSQL refusing a value the schemas let through (a number past a column's range, text it cannot store, a
 * check or reference that fails): the request's fault, so a 4xx, with the database's own words kept for the log.
 * Anything else stays an internal error.
 */
export function databaseRefusal(e: unknown): { status: 400 | 422; code: string; message: string } | null {
	const code = (e as { code?: unknown })?.code;
	if (typeof code !== 'string') return null;
	if (code.startsWith('22')) {
		log.warn({ err: errorDetails(e) }, 'database refused a value');
		return {
			status: 400,
			code: 'invalid_input',
			message: 'A value is out of range or is not text that can be stored; nothing was saved.'
		};
	}
	if (code === '23503' || code === '23514' || code === '23502') {
		log.warn({ err: errorDetails(e) }, 'database refused a change');
		return {
			status: 422,
			code: 'not_allowed_now',
			message: 'That change does not fit what is stored (a missing or invalid reference); nothing was saved.'
		};
	}
	return null;
}

/** The numeric id of a route parameter already checked by the `id` param matcher. */
export function idParam(event: RequestEvent, name = 'id'): number {
	return Number(event.params[name as keyof typeof event.params]);
}

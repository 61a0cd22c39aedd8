// The shape every JSON endpoint shares: checked content type, zod-validated bodies, and errors as
// `{ code, message, issues? }` with a 4xx (or 503 while the database is away), never a 500 for bad input.
import { json, type RequestEvent } from '@sveltejs/kit';
import type { z } from 'zod';
import { isDatabaseUnavailable } from './db';
import { Forbidden, NotAllowedNow, NotFound, VersionConflict } from './errors';

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

export function problem(status: number, code: string, message: string, extra: Record<string, unknown> = {}) {
	return json({ code, message, ...extra }, { status });
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
	let body: unknown;
	try {
		body = await request.json();
	} catch (e) {
		if (e instanceof Error && /body.*(limit|large)|content-length/i.test(e.message)) {
			throw new ApiError(413, 'too_large', 'The request body is too large.');
		}
		throw new ApiError(400, 'invalid_json', 'The request body is not valid JSON.');
	}
	return parse(schema, body);
}

export function parse<T extends z.ZodType>(schema: T, value: unknown): z.infer<T> {
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
			const response = problem(e.status, e.code, e.message, e.issues ? { issues: e.issues } : {});
			for (const [name, value] of Object.entries(e.headers)) response.headers.set(name, value);
			return response;
		}
		if (e instanceof VersionConflict) return problem(409, 'version_conflict', e.message, { current: e.current });
		if (e instanceof NotFound) return problem(404, 'not_found', e.message || 'Not found.');
		if (e instanceof Forbidden) return problem(403, 'forbidden', e.message || 'Your role may not do this.');
		if (e instanceof NotAllowedNow) return problem(422, e.code, e.message);
		if (isDatabaseUnavailable(e)) {
			return json(
				{ code: 'database_unavailable', message: 'The database is not answering. Try again in a few seconds.' },
				{ status: 503, headers: { 'retry-after': '5' } }
			);
		}
		throw e;
	}
}

/** The numeric id of a route parameter already checked by the `id` param matcher. */
export function idParam(event: RequestEvent, name = 'id'): number {
	return Number(event.params[name as keyof typeof event.params]);
}

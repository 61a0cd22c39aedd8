// How the manager's form actions answer: bad input is 400 with field errors and what was typed; a refused change
// (stale version, not allowed now, gone) is a 4xx with a message a person can act on; nothing is saved in either case.
import { fail, type ActionFailure } from '@sveltejs/kit';
import type { z } from 'zod';
import { databaseRefusal, findNul, NUL_MESSAGE } from '$lib/server/api';
import { isDatabaseUnavailable } from '$lib/server/db';
import { NotAllowedNow, NotFound, VersionConflict } from '$lib/server/errors';
import { fieldErrors, formValues } from '$lib/schemas/manage';

export interface Refusal {
	/** What went wrong, for programs (as in the JSON API's errors). */
	code: string;
	/** Which form (and row) the answer belongs to, so the page shows it in the right place. */
	form: string;
	id?: number;
	values: Record<string, string>;
	errors: Record<string, string>;
	message: string;
	/** The field errors as a list, the same shape as the JSON API's `issues`. */
	issues: { path: string; message: string }[];
	/** The form was older than the stored row: the page shows the current values, not what was typed. */
	stale?: boolean;
}

/**
 * The request's form data, or null when the body cannot be read as a form (a malformed multipart or URL-encoded
 * body; other content types are refused with 415 before any action runs, in hooks.server.ts).
 */
export async function readForm(request: Request): Promise<FormData | null> {
	try {
		return await request.formData();
	} catch {
		return null;
	}
}

export const UNREADABLE_FORM = 'The form could not be read; reload the page and try again.';

export type Outcome = { form: string; id?: number; done: string } | ActionFailure<Refusal>;

/**
 * Reads `fields` from the request, validates them with `schema`, then runs `work`; `onTaken` names the field a
 * uniqueness refusal belongs to (e.g. the e-mail of a new person).
 */
export async function act<S extends z.ZodType>(
	request: Request,
	formName: string,
	fields: readonly string[],
	schema: S,
	work: (input: z.infer<S>) => Promise<string>,
	takenField?: string
): Promise<Outcome> {
	const form = await readForm(request);
	if (!form)
		return fail(400, {
			code: 'unreadable_form',
			form: formName,
			values: {},
			errors: {},
			issues: [],
			message: UNREADABLE_FORM
		});
	const values = formValues(form, fields);
	const rowId = Number(values.id) || undefined;
	const refuse = (status: number, code: string, message: string, errors: Record<string, string> = {}, stale = false) =>
		fail(status, {
			code,
			form: formName,
			id: Number.isSafeInteger(rowId) ? rowId : undefined,
			values: withoutSecrets(values),
			errors,
			issues: Object.entries(errors).map(([path, m]) => ({ path, message: m })),
			message,
			stale
		});
	// PostgreSQL cannot store NUL in text; say which field rather than fail deeper down.
	const nul = findNul(values);
	if (nul !== null)
		return refuse(400, 'invalid_input', 'Check the marked fields: nothing was saved.', { [nul]: NUL_MESSAGE });
	const parsed = schema.safeParse(values);
	if (!parsed.success)
		return refuse(400, 'invalid_input', 'Check the marked fields: nothing was saved.', fieldErrors(parsed.error));
	try {
		return { form: formName, id: rowId, done: await work(parsed.data) };
	} catch (e) {
		if (e instanceof VersionConflict)
			return refuse(
				409,
				'version_conflict',
				'Someone else changed this after you opened the page, so nothing was saved. The page now shows the current values; check them and try again.',
				{},
				true
			);
		if (e instanceof NotAllowedNow) {
			if (e.code === 'email_taken' || e.code === 'code_taken')
				return refuse(409, e.code, 'Check the marked fields: nothing was saved.', {
					[takenField ?? 'form']: e.message
				});
			return refuse(409, e.code, e.message);
		}
		if (e instanceof NotFound) return refuse(404, 'not_found', e.message);
		if (isDatabaseUnavailable(e))
			return refuse(
				503,
				'database_unavailable',
				'The database is not answering, so nothing was saved. Try again in a few seconds.'
			);
		const refusal = databaseRefusal(e);
		if (refusal) return refuse(refusal.status, refusal.code, refusal.message);
		throw e;
	}
}

/** Passwords and PINs are never sent back to the page. */
function withoutSecrets(values: Record<string, string>): Record<string, string> {
	const { password: _p, pin: _n, ...rest } = values;
	return rest;
}

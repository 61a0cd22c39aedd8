import { error, fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { databaseRefusal, findNul, NUL_MESSAGE } from '$lib/server/api';
import { readForm, UNREADABLE_FORM } from '../../form-outcome';
import { isDatabaseUnavailable } from '$lib/server/db';
import * as vehicles from '$lib/server/db/vehicles';
import { NotAllowedNow, NotFound, VersionConflict } from '$lib/server/errors';
import { actorOf, orUnavailable } from '$lib/server/guard';
import { fieldErrors, vehicleColumns, vehicleDataSchema, type VehicleRecord } from '$lib/schemas/vehicles';

export const load: PageServerLoad = async ({ params }) => {
	const record = await orUnavailable(() => vehicles.readRecord(Number(params.id)));
	if (!record) error(404, 'No such vehicle record.');
	return { record };
};

type Errors = ReturnType<typeof fieldErrors>;

const issuesOf = (errors: Errors) =>
	Object.entries(errors).map(([path, message]) => ({ path, message: String(message) }));

export const actions: Actions = {
	save: async ({ request, params, locals }) => {
		const form = await readForm(request);
		if (!form)
			return fail(400, {
				code: 'unreadable_form',
				values: Object.fromEntries(vehicleColumns.map((c) => [c, ''])),
				errors: {} as Errors,
				issues: [],
				message: UNREADABLE_FORM
			});
		const values = Object.fromEntries(
			vehicleColumns.map((c) => {
				const v = form.get(c);
				return [c, typeof v === 'string' ? v : ''];
			})
		);
		const version = Number(form.get('version'));
		const noErrors: Errors = {};
		if (!Number.isInteger(version) || version < 1 || version > 2_147_483_647)
			return fail(400, {
				code: 'invalid_input',
				values,
				errors: noErrors,
				issues: [{ path: 'version', message: 'Missing version' }],
				message: 'The form did not say which version of the record it showed: reload the page and edit again.'
			});
		// PostgreSQL cannot store NUL in text: that field is marked like any other refused value.
		const nul = findNul(values);
		const parsed = vehicleDataSchema.safeParse(values);
		if (nul !== null || !parsed.success) {
			const errors = nul !== null ? ({ [nul]: NUL_MESSAGE } as Errors) : fieldErrors(parsed.error!);
			return fail(400, {
				code: 'invalid_input',
				values,
				errors,
				issues: issuesOf(errors),
				message: 'Check the marked fields: nothing was saved.'
			});
		}
		try {
			const record = await vehicles.update(actorOf(locals), Number(params.id), version, parsed.data);
			return { saved: record.version, changed: record.version !== version };
		} catch (e) {
			if (e instanceof VersionConflict)
				return fail(409, {
					code: 'version_conflict',
					values,
					errors: noErrors,
					issues: [],
					current: e.current as VehicleRecord,
					message:
						'Someone else saved this record after you opened it, so nothing was saved. Their values are shown under each field that differs from yours; save again to replace them with yours.'
				});
			if (e instanceof NotAllowedNow)
				return fail(409, { code: e.code, values, errors: noErrors, issues: [], message: e.message });
			if (e instanceof NotFound) error(404, 'No such vehicle record: it may have been deleted.');
			if (isDatabaseUnavailable(e))
				return fail(503, {
					code: 'database_unavailable',
					values,
					errors: noErrors,
					issues: [],
					message: 'The database is not answering, so nothing was saved. Try again in a few seconds.'
				});
			const refusal = databaseRefusal(e);
			if (refusal)
				return fail(refusal.status, {
					code: refusal.code,
					message: refusal.message,
					values,
					errors: noErrors,
					issues: []
				});
			throw e;
		}
	}
};

import { error, fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
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

export const actions: Actions = {
	save: async ({ request, params, locals }) => {
		const form = await request.formData();
		const values = Object.fromEntries(
			vehicleColumns.map((c) => {
				const v = form.get(c);
				return [c, typeof v === 'string' ? v : ''];
			})
		);
		const version = Number(form.get('version'));
		const noErrors: Errors = {};
		if (!Number.isInteger(version) || version < 1)
			return fail(400, {
				values,
				errors: noErrors,
				message: 'The form did not say which version of the record it showed: reload the page and edit again.'
			});
		const parsed = vehicleDataSchema.safeParse(values);
		if (!parsed.success)
			return fail(400, {
				values,
				errors: fieldErrors(parsed.error),
				message: 'Check the marked fields: nothing was saved.'
			});
		try {
			const record = await vehicles.update(actorOf(locals), Number(params.id), version, parsed.data);
			return { saved: record.version, changed: record.version !== version };
		} catch (e) {
			if (e instanceof VersionConflict)
				return fail(409, {
					values,
					errors: noErrors,
					current: e.current as VehicleRecord,
					message:
						'Someone else saved this record after you opened it, so nothing was saved. Their values are shown under each field that differs from yours; save again to replace them with yours.'
				});
			if (e instanceof NotAllowedNow) return fail(409, { values, errors: noErrors, message: e.message });
			if (e instanceof NotFound) error(404, 'No such vehicle record: it may have been deleted.');
			if (isDatabaseUnavailable(e))
				return fail(503, {
					values,
					errors: noErrors,
					message: 'The database is not answering, so nothing was saved. Try again in a few seconds.'
				});
			throw e;
		}
	}
};

import { fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { isDatabaseUnavailable } from '$lib/server/db';
import { actorOf } from '$lib/server/guard';
import * as vehicleImport from '$lib/server/vehicle-import';
import { vehicleColumns, vehicleFieldInfo } from '$lib/schemas/vehicles';

export const load: PageServerLoad = () => ({
	maxBytes: vehicleImport.MAX_IMPORT_BYTES,
	columns: vehicleColumns.map((name) => ({ name, ...vehicleFieldInfo[name] }))
});

const unavailable = () =>
	fail(503, { message: 'The database is not answering, so nothing was imported. Try again in a few seconds.' });

export const actions: Actions = {
	/** Reads and checks the file and shows what importing it would do; writes nothing. */
	preview: async ({ request }) => {
		const read = await vehicleImport.readUpload(request);
		if ('problem' in read) return fail(read.problem.status, { message: read.problem.message });
		try {
			return { preview: await vehicleImport.preview(read.upload) };
		} catch (e) {
			if (isDatabaseUnavailable(e)) return unavailable();
			throw e;
		}
	},
	/** The confirm: the same file again with the preview's token; imported whole or not at all. */
	import: async ({ request, locals }) => {
		const read = await vehicleImport.readUpload(request);
		if ('problem' in read) return fail(read.problem.status, { message: read.problem.message });
		const token = read.form.get('token');
		if (typeof token !== 'string' || token === '')
			return fail(400, { message: 'Preview the file first, then confirm the import.' });
		try {
			const result = await vehicleImport.commit(actorOf(locals), read.upload, token);
			if (!result.ok) return fail(result.status, { message: result.message, preview: result.preview });
			return { imported: result.outcome, fileName: result.fileName };
		} catch (e) {
			if (isDatabaseUnavailable(e)) return unavailable();
			throw e;
		}
	}
};

import { fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { databaseRefusal } from '$lib/server/api';
import { isDatabaseUnavailable } from '$lib/server/db';
import { actorOf } from '$lib/server/guard';
import * as vehicleImport from '$lib/server/vehicle-import';
import { vehicleColumns, vehicleFieldInfo } from '$lib/schemas/vehicles';

export const load: PageServerLoad = () => ({
	maxBytes: vehicleImport.MAX_IMPORT_BYTES,
	columns: vehicleColumns.map((name) => ({ name, ...vehicleFieldInfo[name] }))
});

const unavailable = () =>
	fail(503, {
		code: 'database_unavailable',
		issues: [],
		message: 'The database is not answering, so nothing was imported. Try again in a few seconds.'
	});

const codes: Record<number, string> = { 400: 'invalid_upload', 413: 'too_large', 415: 'unsupported_media_type' };
const refused = (status: number, message: string) =>
	fail(status, { code: codes[status] ?? 'refused', issues: [], message });

/** A failure the database reports about the file's values (NUL in a cell, a number past a column's range). */
function refusedByDatabase(e: unknown) {
	const refusal = databaseRefusal(e);
	return refusal ? fail(refusal.status, { ...refusal, issues: [] }) : null;
}

export const actions: Actions = {
	/** Reads and checks the file and shows what importing it would do; writes nothing. */
	preview: async ({ request }) => {
		const read = await vehicleImport.readUpload(request);
		if ('problem' in read) return refused(read.problem.status, read.problem.message);
		try {
			return { preview: await vehicleImport.preview(read.upload) };
		} catch (e) {
			if (isDatabaseUnavailable(e)) return unavailable();
			const refusal = refusedByDatabase(e);
			if (refusal) return refusal;
			throw e;
		}
	},
	/** The confirm: the same file again with the preview's token; imported whole or not at all. */
	import: async ({ request, locals }) => {
		const read = await vehicleImport.readUpload(request);
		if ('problem' in read) return refused(read.problem.status, read.problem.message);
		const token = read.form.get('token');
		if (typeof token !== 'string' || token === '')
			return refused(400, 'Preview the file first, then confirm the import.');
		try {
			const result = await vehicleImport.commit(actorOf(locals), read.upload, token);
			if (!result.ok)
				return fail(result.status, {
					code: result.status === 409 ? 'version_conflict' : 'invalid_upload',
					issues: [],
					message: result.message,
					preview: result.preview
				});
			return { imported: result.outcome, fileName: result.fileName };
		} catch (e) {
			if (isDatabaseUnavailable(e)) return unavailable();
			const refusal = refusedByDatabase(e);
			if (refusal) return refusal;
			throw e;
		}
	}
};

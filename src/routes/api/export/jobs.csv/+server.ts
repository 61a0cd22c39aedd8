import type { RequestHandler } from './$types';
import { parse, respond } from '$lib/server/api';
import { csvResponse, toCsv } from '$lib/server/csv';
import * as exports from '$lib/server/db/exports';
import { actorOf } from '$lib/server/guard';
import { exportRangeSchema } from '$lib/schemas/exports';

// The store's jobs taken in from ?from= to ?to= (days in the store's time zone), one row per job.
export const GET: RequestHandler = ({ url, locals }) =>
	respond(async () => {
		const range = parse(exportRangeSchema, Object.fromEntries(url.searchParams));
		const { header, rows } = await exports.jobs(actorOf(locals).storeId, range);
		return csvResponse(`lugline-jobs-${range.from}-to-${range.to}.csv`, toCsv(header, rows));
	});

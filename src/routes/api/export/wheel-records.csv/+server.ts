import type { RequestHandler } from './$types';
import { parse, respond } from '$lib/server/api';
import { csvResponse, toCsv } from '$lib/server/csv';
import * as exports from '$lib/server/db/exports';
import { actorOf } from '$lib/server/guard';
import { exportRangeSchema } from '$lib/schemas/exports';

// The wheel records of the store's jobs taken in from ?from= to ?to=, one row per wheel, in SI units.
export const GET: RequestHandler = ({ url, locals }) =>
	respond(async () => {
		const range = parse(exportRangeSchema, Object.fromEntries(url.searchParams));
		const { header, rows } = await exports.wheelRecords(actorOf(locals).storeId, range);
		return csvResponse(`lugline-wheel-records-${range.from}-to-${range.to}.csv`, toCsv(header, rows));
	});

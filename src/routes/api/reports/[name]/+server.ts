import type { RequestHandler } from './$types';
import { parse, respond } from '$lib/server/api';
import { csvResponse, toCsv } from '$lib/server/csv';
import * as reports from '$lib/server/db/reports';
import { NotFound } from '$lib/server/errors';
import { actorOf } from '$lib/server/guard';
import { reportNameSchema, reportRangeSchema } from '$lib/schemas/reports';

// One report as CSV for ?from= (first day) to ?to= (end day, excluded), days in the store's time zone.
export const GET: RequestHandler = ({ params, url, locals }) =>
	respond(async () => {
		const named = reportNameSchema.safeParse(params.name);
		if (!named.success) throw new NotFound(`No report called ${params.name}.`);
		const name = named.data;
		const range = parse(reportRangeSchema, Object.fromEntries(url.searchParams));
		const { header, rows } = await reports.table(name, actorOf(locals).storeId, range);
		return csvResponse(`lugline-${name}-${range.from}-to-${range.to}.csv`, toCsv(header, rows));
	});

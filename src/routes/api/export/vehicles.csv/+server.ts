import type { RequestHandler } from './$types';
import { respond } from '$lib/server/api';
import { csvResponse, toCsv } from '$lib/server/csv';
import * as vehicles from '$lib/server/db/vehicles';
import { vehicleColumns } from '$lib/schemas/vehicles';

// All vehicle data in the import's own column format, so a manager can edit it in a spreadsheet and import it back
// (cells the formula guard marked come back as they were; unchanged rows change nothing).
export const GET: RequestHandler = () =>
	respond(async () => {
		const rows = (await vehicles.all()).map((v) => vehicleColumns.map((c) => v[c]));
		const today = new Date().toISOString().slice(0, 10);
		return csvResponse(`lugline-vehicles-${today}.csv`, toCsv(vehicleColumns, rows));
	});

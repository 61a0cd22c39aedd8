import type { PageServerLoad } from './$types';
import * as vehicles from '$lib/server/db/vehicles';
import { orUnavailable } from '$lib/server/guard';
import { daysBefore, todayIn } from '$lib/schemas/exports';
import { vehicleSearchSchema } from '$lib/schemas/vehicles';

export const load: PageServerLoad = async ({ url, parent }) => {
	const search = vehicleSearchSchema.parse(Object.fromEntries(url.searchParams));
	const [list, { store }] = await Promise.all([orUnavailable(() => vehicles.list(search)), parent()]);
	// The exports' date fields start at the last 30 days where the store is.
	const to = todayIn(store.timezone);
	return { q: search.q, list, exportRange: { from: daysBefore(to, 29), to } };
};

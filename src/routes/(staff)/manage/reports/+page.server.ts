import { error } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';
import * as reports from '$lib/server/db/reports';
import { orUnavailable, staffOf } from '$lib/server/guard';
import { addDays, reportRangeSchema } from '$lib/schemas/reports';
import { todayIn } from '$lib/schemas/exports';

// ?from=YYYY-MM-DD&to=YYYY-MM-DD (end excluded); with neither, today where the store is.
export const load: PageServerLoad = async ({ locals, url, parent }) => {
	const staff = staffOf(locals);
	const { store } = await parent();
	let today: string;
	try {
		today = todayIn(store.timezone);
	} catch {
		today = todayIn('UTC');
	}
	const from = url.searchParams.get('from') ?? today;
	const to = url.searchParams.get('to') ?? addDays(from, 1);
	const parsed = reportRangeSchema.safeParse({ from, to });
	if (!parsed.success) error(400, parsed.error.issues[0].message);
	const range = parsed.data;
	const [throughput, pace, promises, waiting, force, weights, ages] = await Promise.all([
		orUnavailable(() => reports.throughput(staff.storeId, range)),
		orUnavailable(() => reports.pace(staff.storeId, range)),
		orUnavailable(() => reports.promises(staff.storeId, range)),
		orUnavailable(() => reports.waiting(staff.storeId, range)),
		orUnavailable(() => reports.force(staff.storeId, range)),
		orUnavailable(() => reports.weights(staff.storeId, range)),
		orUnavailable(() => reports.tireAges(staff.storeId, range))
	]);
	return { timezone: store.timezone, today, range, throughput, pace, promises, waiting, force, weights, ages };
};

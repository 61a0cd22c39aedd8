import type { PageServerLoad } from './$types';
import * as stores from '$lib/server/db/stores';
import { orUnavailable, staffOf } from '$lib/server/guard';

export const load: PageServerLoad = async ({ locals }) => {
	const staff = staffOf(locals);
	const [counts, bays] = await orUnavailable(() =>
		Promise.all([stores.floorCounts(staff.storeId), stores.bays(staff.storeId)])
	);
	return { counts, bays };
};

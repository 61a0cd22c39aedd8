import type { PageServerLoad } from './$types';
import * as boardCache from '$lib/server/live/board-cache';
import * as stores from '$lib/server/db/stores';
import { orUnavailable, staffOf } from '$lib/server/guard';

// The console starts from a snapshot rendered with the page (the instance's copy, as GET /api/board serves it);
// the live stream takes over from its cursor.
export const load: PageServerLoad = async ({ locals }) => {
	const staff = staffOf(locals);
	const [snapshot, services] = await orUnavailable(() =>
		Promise.all([boardCache.snapshot(staff.storeId), stores.services(staff.storeId)])
	);
	return { board: snapshot, services, role: staff.role, userId: staff.userId };
};

import type { PageServerLoad } from './$types';
import * as board from '$lib/server/db/board';
import { orUnavailable, staffOf } from '$lib/server/guard';

// The console starts from a snapshot rendered with the page; the live stream takes over from its cursor.
export const load: PageServerLoad = async ({ locals }) => {
	const staff = staffOf(locals);
	return { board: await orUnavailable(() => board.snapshot(staff.storeId)), role: staff.role };
};

import { error } from '@sveltejs/kit';
import type { LayoutServerLoad } from './$types';
import * as stores from '$lib/server/db/stores';
import { orUnavailable, staffOf } from '$lib/server/guard';

// The shell's frame data. Authorisation is not done here: hooks.server.ts has checked this request already.
export const load: LayoutServerLoad = async ({ locals }) => {
	const staff = staffOf(locals);
	const store = await orUnavailable(() => stores.read(staff.storeId));
	if (!store) error(404, 'Your store no longer exists. Ask a manager.');
	return { staff: { name: staff.name, role: staff.role }, store: { name: store.name, timezone: store.timezone } };
};

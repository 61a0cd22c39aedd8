import { error } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';
import * as boardCache from '$lib/server/live/board-cache';
import * as claims from '$lib/server/db/claims';
import * as stores from '$lib/server/db/stores';
import { orUnavailable, staffOf } from '$lib/server/guard';

// A bay's shared screen: the same live floor as the console, the people who may claim the screen, and the store's
// limits the wheel record is checked against.
export const load: PageServerLoad = async ({ locals, params }) => {
	const staff = staffOf(locals);
	const [snapshot, people, rules] = await orUnavailable(() =>
		Promise.all([boardCache.snapshot(staff.storeId), claims.claimants(staff.storeId), stores.rules(staff.storeId)])
	);
	const bay = snapshot.bays.find((b) => b.code === params.code);
	if (!bay) error(404, `There is no bay ${params.code} in your store.`);
	return { board: snapshot, bayId: bay.id, code: bay.code, people, rules: rules! };
};

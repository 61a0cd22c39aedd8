import type { PageServerLoad } from './$types';
import * as users from '$lib/server/db/users';
import { orUnavailable, staffOf } from '$lib/server/guard';

export const load: PageServerLoad = async ({ locals }) => {
	const staff = staffOf(locals);
	const people = await orUnavailable(() => users.listForStore(staff.storeId));
	return { people: people.map(({ id, name, email, role, active }) => ({ id, name, email, role, active })) };
};

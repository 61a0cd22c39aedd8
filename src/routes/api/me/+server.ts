import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { staffOf } from '$lib/server/guard';

// Who this session is: lets a screen show the signed-in person and role without a page load.
export const GET: RequestHandler = async ({ locals }) => {
	const { userId, storeId, name, email, role } = staffOf(locals);
	return json({ userId, storeId, name, email, role });
};

import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { ping } from '$lib/server/db';

// For load balancers and the tests: 200 when the database answers, 503 within a few seconds when it does not.
export const GET: RequestHandler = async () => {
	const database = await ping(2000);
	const headers = { 'cache-control': 'no-store' };
	if (database.up) return json({ status: 'ok', database: { state: 'up', ms: database.ms } }, { headers });
	return json(
		{ status: 'unavailable', database: { state: 'down', reason: database.reason } },
		{ status: 503, headers: { ...headers, 'retry-after': '5' } }
	);
};

import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { ping } from '$lib/server/db';
import { subscriberCount } from '$lib/server/live/hub';
import { state as listenerState } from '$lib/server/live/listener';

// For load balancers, operators and the tests: 200 when the database answers, 503 within a few seconds when it does
// not; also how many event streams this instance holds open and whether its LISTEN connection is up (counts only,
// nothing about who).
export const GET: RequestHandler = async () => {
	const database = await ping(2000);
	const headers = { 'cache-control': 'no-store' };
	const live = { streams: subscriberCount(), listening: listenerState().connected };
	if (database.up) return json({ status: 'ok', database: { state: 'up', ms: database.ms }, live }, { headers });
	return json(
		{ status: 'unavailable', database: { state: 'down', reason: database.reason }, live },
		{ status: 503, headers: { ...headers, 'retry-after': '5' } }
	);
};

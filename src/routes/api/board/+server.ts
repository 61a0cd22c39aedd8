import type { RequestHandler } from './$types';
import { respond } from '$lib/server/api';
import * as boardCache from '$lib/server/live/board-cache';
import { actorOf } from '$lib/server/guard';

// The whole floor in one snapshot, with the cursor the live stream resumes from (kept per store until its next event).
export const GET: RequestHandler = ({ locals }) =>
	respond(async () => {
		const body = await boardCache.snapshotJson(actorOf(locals).storeId);
		return new Response(body, { headers: { 'content-type': 'application/json', 'cache-control': 'no-store' } });
	});

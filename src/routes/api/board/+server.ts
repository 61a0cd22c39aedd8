import type { RequestHandler } from './$types';
import { respond } from '$lib/server/api';
import * as board from '$lib/server/db/board';
import { actorOf } from '$lib/server/guard-api';

// The whole floor in one snapshot, with the cursor the live stream resumes from (built as JSON in the database).
export const GET: RequestHandler = ({ locals }) =>
	respond(async () => {
		const body = await board.snapshotJson(actorOf(locals).storeId);
		return new Response(body, { headers: { 'content-type': 'application/json', 'cache-control': 'no-store' } });
	});

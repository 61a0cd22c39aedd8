import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { respond } from '$lib/server/api';
import * as board from '$lib/server/db/board';
import { actorOf } from '$lib/server/guard-api';

// The whole floor in one snapshot, with the cursor the live stream resumes from.
export const GET: RequestHandler = ({ locals }) =>
	respond(async () => json(await board.snapshot(actorOf(locals).storeId), { headers: { 'cache-control': 'no-store' } }));

import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { respond } from '$lib/server/api';
import * as vehicles from '$lib/server/db/vehicles';

// The palette's compact vehicle index, loaded once per screen (and kept by the browser for a few minutes).
export const GET: RequestHandler = () =>
	respond(async () => json(await vehicles.index(), { headers: { 'cache-control': 'private, max-age=300' } }));

import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { readJson, respond } from '$lib/server/api';
import * as queues from '$lib/server/db/queues';
import { actorOf } from '$lib/server/guard';
import { moveWheelsSchema } from '$lib/schemas/floor';

// Several wheels (a whole job) to one bay or back to waiting, in one transaction: all or none.
export const POST: RequestHandler = ({ locals, request }) =>
	respond(async () => json(await queues.move(actorOf(locals), await readJson(request, moveWheelsSchema))));

import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { idParam, readJson, respond } from '$lib/server/api';
import * as records from '$lib/server/db/records';
import { actorOf } from '$lib/server/guard';
import { recordPatchSchema } from '$lib/schemas/record';

// A wheel's record: read it, or save some of its fields (the body carries the record version the screen saw).
export const GET: RequestHandler = (event) =>
	respond(async () => json(await records.read(actorOf(event.locals), idParam(event))));

export const PUT: RequestHandler = (event) =>
	respond(async () => {
		const patch = await readJson(event.request, recordPatchSchema);
		return json(await records.save(actorOf(event.locals), idParam(event), patch));
	});

import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { idParam, readJson, respond } from '$lib/server/api';
import * as jobs from '$lib/server/db/jobs';
import { actorOf } from '$lib/server/guard';
import { patchJobSchema } from '$lib/schemas/floor';

export const GET: RequestHandler = (event) =>
	respond(async () => json(await jobs.read(actorOf(event.locals), idParam(event))));

export const PATCH: RequestHandler = (event) =>
	respond(async () => {
		const patch = await readJson(event.request, patchJobSchema);
		return json(await jobs.update(actorOf(event.locals), idParam(event), patch));
	});

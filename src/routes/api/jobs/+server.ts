import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { readJson, respond } from '$lib/server/api';
import * as jobs from '$lib/server/db/jobs';
import { actorOf } from '$lib/server/guard';
import { createJobSchema } from '$lib/schemas/floor';

export const POST: RequestHandler = ({ locals, request }) =>
	respond(async () => {
		const input = await readJson(request, createJobSchema);
		return json(await jobs.create(actorOf(locals), input), { status: 201 });
	});

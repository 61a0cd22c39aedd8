import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { idParam, readJson, respond } from '$lib/server/api';
import * as wheels from '$lib/server/db/wheels';
import { actorOf } from '$lib/server/guard';
import { patchWheelSchema } from '$lib/schemas/floor';

// Move, take back, start, finish, stop or reopen one wheel; the body carries the version the screen showed.
export const PATCH: RequestHandler = (event) =>
	respond(async () => {
		const change = await readJson(event.request, patchWheelSchema);
		return json(await wheels.patch(actorOf(event.locals), idParam(event), change));
	});

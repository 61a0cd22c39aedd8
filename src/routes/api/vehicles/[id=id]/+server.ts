import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { idParam, respond } from '$lib/server/api';
import { NotFound } from '$lib/server/errors';
import * as vehicles from '$lib/server/db/vehicles';

// One vehicle's wheel facts, for the focus pane and the bay display.
export const GET: RequestHandler = (event) =>
	respond(async () => {
		const facts = await vehicles.read(idParam(event));
		if (!facts) throw new NotFound('No such vehicle record.');
		return json(facts);
	});

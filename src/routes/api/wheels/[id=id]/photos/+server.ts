import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { idParam, respond } from '$lib/server/api';
import { actorOf } from '$lib/server/guard';
import * as photos from '$lib/server/photos';

// A wheel's photos: list them, or add one (multipart/form-data: a `photo` file and an optional `kind`). SvelteKit
// origin-checks multipart posts, so a form on another site cannot upload here.
export const GET: RequestHandler = (event) =>
	respond(async () => json({ photos: await photos.listForWheel(actorOf(event.locals), idParam(event)) }));

export const POST: RequestHandler = (event) =>
	respond(async () => json(await photos.add(actorOf(event.locals), idParam(event), event.request), { status: 201 }));

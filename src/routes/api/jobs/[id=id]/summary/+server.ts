// POST: queue a *service summary* e-mail of the job's wheel records for its customer (src/lib/server/mail/outbox.ts).
// The body is an empty JSON object: the JSON content type is what keeps a cross-site form from posting here.
import { json } from '@sveltejs/kit';
import { z } from 'zod';
import type { RequestHandler } from './$types';
import { idParam, readJson, respond } from '$lib/server/api';
import { actorOf } from '$lib/server/guard';
import * as outbox from '$lib/server/mail/outbox';

const bodySchema = z.strictObject({}, { error: 'Send an empty JSON object: {}' });

export const POST: RequestHandler = (event) =>
	respond(async () => {
		await readJson(event.request, bodySchema);
		const queued = await outbox.requestSummary(actorOf(event.locals), idParam(event));
		return json(queued, { status: 202 });
	});

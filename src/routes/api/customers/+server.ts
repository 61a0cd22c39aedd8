import { json } from '@sveltejs/kit';
import { z } from 'zod';
import type { RequestHandler } from './$types';
import { parse, respond } from '$lib/server/api';
import * as customers from '$lib/server/db/customers';
import { actorOf } from '$lib/server/guard';

const querySchema = z.strictObject({
	q: z
		.string()
		.trim()
		.min(1, 'Type part of a name, phone number or plate')
		.max(100, 'The search is too long (at most 100 characters)'),
	limit: z.coerce.number().int().min(1).max(50).default(20)
});

// The palette's and intake's customer search: name (typos forgiven), phone fragment or plate.
export const GET: RequestHandler = ({ locals, url }) =>
	respond(async () => {
		const { q, limit } = parse(querySchema, Object.fromEntries(url.searchParams));
		return json({ customers: await customers.search(actorOf(locals).storeId, q, limit) });
	});

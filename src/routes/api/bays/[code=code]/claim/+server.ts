import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { readJson, respond } from '$lib/server/api';
import * as claims from '$lib/server/db/claims';
import { staffOf } from '$lib/server/guard';
import { CLAIM_HEADER, claimSchema, type ClaimView } from '$lib/schemas/bay';

// Claim a bay screen with a PIN; DELETE ends the claim the screen holds.
export const POST: RequestHandler = ({ locals, params, request }) =>
	respond(async () => {
		const input = await readJson(request, claimSchema);
		const { token, claim } = await claims.claim(staffOf(locals).storeId, params.code, input.userId, input.pin);
		const view: ClaimView = { token, bayCode: claim.bayCode, userId: claim.userId, name: claim.name, role: claim.role };
		return json(view, { status: 201, headers: { 'cache-control': 'no-store' } });
	});

export const DELETE: RequestHandler = ({ locals, request }) =>
	respond(async () => {
		const token = request.headers.get(CLAIM_HEADER);
		if (token) await claims.release(staffOf(locals).storeId, token);
		return new Response(null, { status: 204 });
	});

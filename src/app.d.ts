import type { StaffSession } from '$lib/server/auth';
import type { Claim } from '$lib/server/db/claims';

declare global {
	namespace App {
		interface Locals {
			/** Set by hooks.server.ts once the request has passed authorisation; absent on public routes. */
			staff?: StaffSession;
			/** Set when an API request carries a live bay-screen claim: the person standing at the bay. */
			claim?: Claim;
			/** Set first thing for every request (hooks.server.ts): sent back as `x-request-id` and used in the log. */
			requestId?: string;
		}
		interface Error {
			message: string;
			code?: string;
			/** The request id of an unexpected error, to find its details in the log. */
			id?: string;
			issues?: { path: string; message: string }[];
		}
	}
}

export {};

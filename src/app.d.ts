import type { StaffSession } from '$lib/server/auth';
import type { Claim } from '$lib/server/db/claims';

declare global {
	namespace App {
		interface Locals {
			/** Set by hooks.server.ts once the request has passed authorisation; absent on public routes. */
			staff?: StaffSession;
			/** Set when an API request carries a live bay-screen claim: the person standing at the bay. */
			claim?: Claim;
		}
		interface Error {
			message: string;
			code?: string;
		}
	}
}

export {};

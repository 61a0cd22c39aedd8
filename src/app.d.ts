import type { StaffSession } from '$lib/server/auth';

declare global {
	namespace App {
		interface Locals {
			/** Set by hooks.server.ts once the request has passed authorisation; absent on public routes. */
			staff?: StaffSession;
		}
		interface Error {
			message: string;
			code?: string;
		}
	}
}

export {};

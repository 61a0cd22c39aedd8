// Errors a domain module throws when a request cannot be carried out; src/lib/server/api.ts turns each into a 4xx
// with a message a person can act on.

/** The row changed since the screen read it: the caller gets 409 with the current state. */
export class VersionConflict extends Error {
	constructor(
		readonly current: unknown,
		message = 'Someone else changed this a moment ago. The screen now shows the current state; check it and try again.'
	) {
		super(message);
	}
}

export class NotFound extends Error {}

export class Forbidden extends Error {}

/** The request is well-formed but the floor does not allow it now (e.g. cancelling a job whose work has started). */
export class NotAllowedNow extends Error {
	constructor(
		message: string,
		readonly code = 'not_allowed_now'
	) {
		super(message);
	}
}

// Slows repeated failed sign-ins for one account. Keyed by the e-mail as typed (lower-cased) whether or not an
// account has it, so the slowing itself says nothing about which accounts exist. Kept in PostgreSQL so every app
// instance behind a load balancer counts the same failures.
import { db } from './index';

/** Failures allowed inside the window before each further failure locks the account key for a while. */
export const FREE_FAILURES = 5;
export const WINDOW_MINUTES = 15;
/** The lock doubles with each failure past the free ones (1 s, 2 s, 4 s…) up to this ceiling. */
export const MAX_LOCK_SECONDS = 15 * 60;

/**
 * Per client address (`addr:<address>`, the address adapter-node reports: the socket's, or the configured proxy
 * header's), a larger budget: a store's screens share one public address, and a whole shift may mistype at 7 am.
 */
export const ADDRESS_FREE_FAILURES = 30;

export function accountKey(email: string): string {
	return email.trim().toLowerCase();
}

export function addressKey(address: string): string {
	return `addr:${address}`;
}

/**
 * Counts one failure for `key` in one atomic upsert (two instances failing at once both count): a new window after
 * WINDOW_MINUTES, no lock for the free failures, then a lock that doubles. With `onlyWhenUnlocked`, nothing is
 * counted while the key is locked, and the answer says whether it was.
 */
async function count(key: string, freeFailures: number, onlyWhenUnlocked: boolean): Promise<boolean> {
	const stale = 'f.first_failed_at < now() - make_interval(mins => ?)';
	const result = await db().raw(
		`INSERT INTO signin_failures AS f (account_key, failures, first_failed_at, locked_until)
		 VALUES (?, 1, now(), NULL)
		 ON CONFLICT (account_key) DO UPDATE SET
		   failures = CASE WHEN ${stale} THEN 1 ELSE f.failures + 1 END,
		   first_failed_at = CASE WHEN ${stale} THEN now() ELSE f.first_failed_at END,
		   locked_until = CASE
		     WHEN ${stale} OR f.failures + 1 <= ? THEN NULL
		     ELSE now() + make_interval(secs => LEAST(?, power(2, f.failures + 1 - ? - 1)))
		   END
		 ${onlyWhenUnlocked ? 'WHERE f.locked_until IS NULL OR f.locked_until <= now()' : ''}
		 RETURNING failures`,
		[key, WINDOW_MINUTES, WINDOW_MINUTES, WINDOW_MINUTES, freeFailures, MAX_LOCK_SECONDS, freeFailures]
	);
	return result.rows.length > 0;
}

/**
 * Books one attempt for `key` before the password is checked, atomically: concurrent attempts (on one instance or
 * several) queue on the row, each sees the ones before it, and once the key is locked no attempt is booked at all.
 * A booked attempt counts as a failure until `release` or `clear` says it succeeded. Returns the seconds to wait
 * when the key is locked, else 0.
 */
export async function reserveAttempt(key: string, freeFailures = FREE_FAILURES): Promise<number> {
	if (await count(key, freeFailures, true)) return 0;
	return Math.max(1, await lockedFor(key));
}

/** Takes back a booked attempt that succeeded (the address budget counts failures, not sign-ins). */
export async function release(key: string): Promise<void> {
	await db()('signin_failures')
		.where({ account_key: key })
		.update({ failures: db().raw('GREATEST(failures - 1, 0)') });
}

/** Seconds until this account key may try again, or 0. */
export async function lockedFor(key: string): Promise<number> {
	const row = await db()('signin_failures')
		.select(db().raw('GREATEST(0, CEIL(EXTRACT(EPOCH FROM (locked_until - now())))) AS seconds'))
		.where({ account_key: key })
		.first();
	return row ? Number(row.seconds) : 0;
}

/** Counts one failure, locked or not. */
export async function recordFailure(key: string): Promise<void> {
	await count(key, FREE_FAILURES, false);
}

export async function clear(key: string): Promise<void> {
	await db()('signin_failures').where({ account_key: key }).delete();
}

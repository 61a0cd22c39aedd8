// Transactions for floor writes: retried when PostgreSQL picks this one to break a deadlock or a serialisation
// conflict (both mean "nothing was written, try again"), so the caller sees the outcome, not the collision.
import type { Knex } from 'knex';
import { db } from './index';

const RETRYABLE = new Set(['40P01', '40001']);

/** Thrown inside a transaction when what it locked no longer covers what it must change: start over. */
export class Retry extends Error {}

export async function inTransaction<T>(work: (trx: Knex.Transaction) => Promise<T>, attempts = 4): Promise<T> {
	for (let attempt = 1; ; attempt++) {
		try {
			return await db().transaction(work);
		} catch (error) {
			const code = (error as { code?: string }).code;
			const retryable = error instanceof Retry || (code !== undefined && RETRYABLE.has(code));
			if (!retryable || attempt >= attempts) throw error;
			await new Promise((r) => setTimeout(r, 5 * attempt + Math.random() * 10));
		}
	}
}

// The events writer. Every write that changes the floor calls `append` as the LAST statement of its transaction:
// the events row and its NOTIFY commit with the change or not at all (NOTIFY is delivered only on commit).
//
// Why the advisory lock: ids from a sequence are handed out in one order and may commit in another. A screen that
// has applied event 11 would never see an event 10 that committed after it. Holding one transaction-level lock from
// the events insert to the commit makes events commit in id order, so "everything after my cursor" is always
// complete. The lock is taken last and held only for the insert and the commit (about a millisecond), and nothing
// else is waited for while holding it, so it cannot deadlock.
import type { Knex } from 'knex';
import type { BayView, JobView, WheelView } from '$lib/schemas/floor';

export const CHANNEL = 'lugline_events';

export interface NewEvent {
	storeId: number;
	type: string;
	entity: 'job' | 'wheel' | 'bay';
	entityId: number;
	jobs?: JobView[];
	wheels?: WheelView[];
	bays?: BayView[];
}

export async function append(trx: Knex.Transaction, event: NewEvent): Promise<number> {
	const payload = JSON.stringify({ jobs: event.jobs ?? [], wheels: event.wheels ?? [], bays: event.bays ?? [] });
	// Lock, insert and notify happen in the database function (migrations/…_append-event-function.ts): one round trip.
	// Only the id travels in the notification (its payload must stay under 8000 bytes); listeners read the row.
	const { rows } = await trx.raw('SELECT lugline_append_event(?, ?, ?, ?, ?::jsonb) AS id', [
		event.storeId,
		event.type,
		event.entity,
		event.entityId,
		payload
	]);
	return Number(rows[0].id);
}

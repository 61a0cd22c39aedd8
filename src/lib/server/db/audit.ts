// Who changed what, when: one row per change a person made, written in the same transaction as the change.
import type { Knex } from 'knex';
import type { Actor } from './actor';

export async function record(
	trx: Knex.Transaction,
	actor: Actor,
	action: string,
	entity: string,
	entityId: number,
	detail: Record<string, unknown> = {}
): Promise<void> {
	await trx('audit').insert({
		store_id: actor.storeId,
		user_id: actor.userId,
		action,
		entity,
		entity_id: entityId,
		detail: JSON.stringify(detail)
	});
}

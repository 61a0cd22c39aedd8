// The events writer as one server-side function: take the ordering lock, insert the row, notify its id, in one round
// trip instead of three (see src/lib/server/live/events.ts for why the lock exists).
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.raw(`
		CREATE FUNCTION lugline_append_event(p_store integer, p_type text, p_entity text, p_entity_id integer, p_payload jsonb)
		RETURNS bigint LANGUAGE plpgsql AS $$
		DECLARE
			new_id bigint;
		BEGIN
			PERFORM pg_advisory_xact_lock(1282762604); -- 0x4c75676c: the one lock that orders event commits
			INSERT INTO events (store_id, type, entity, entity_id, payload)
			VALUES (p_store, p_type, p_entity, p_entity_id, p_payload)
			RETURNING id INTO new_id;
			PERFORM pg_notify('lugline_events', new_id::text);
			RETURN new_id;
		END
		$$`);
}

export async function down(knex: Knex): Promise<void> {
	await knex.raw('DROP FUNCTION IF EXISTS lugline_append_event(integer, text, text, integer, jsonb)');
}

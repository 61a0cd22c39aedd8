// The bay screen and the wheel record: a technician claims a shared bay screen with a PIN (one claim per bay, the
// token kept as a hash); the record gains the damage seen and the match-mount rotation; the store gains its
// tire-age policy (a policy, not law: ../shared/reference/check-values.md §3).
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('bay_claims', (t) => {
		t.integer('bay_id').primary().references('bays.id').onDelete('CASCADE');
		t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE');
		t.text('token_hash').notNullable().unique();
		t.timestamp('claimed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
		t.timestamp('seen_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
		t.index(['user_id']);
	});
	await knex.schema.alterTable('wheel_records', (t) => {
		// { tire: string[], rim: string[], puncture?: { location, diameterMm, angled } }
		t.jsonb('damage').notNullable().defaultTo('{}');
		t.decimal('match_mount_deg', 5, 1);
	});
	await knex.raw(`ALTER TABLE wheel_records
		ADD CONSTRAINT wheel_records_damage_object CHECK (jsonb_typeof(damage) = 'object'),
		ADD CONSTRAINT wheel_records_match_mount CHECK (match_mount_deg IS NULL OR match_mount_deg BETWEEN 0 AND 360)`);
	await knex.schema.alterTable('stores', (t) => {
		t.integer('tire_age_limit_years').notNullable().defaultTo(10);
	});
	await knex.raw(
		'ALTER TABLE stores ADD CONSTRAINT stores_tire_age_limit CHECK (tire_age_limit_years BETWEEN 1 AND 30)'
	);
}

export async function down(knex: Knex): Promise<void> {
	await knex.raw('ALTER TABLE stores DROP CONSTRAINT IF EXISTS stores_tire_age_limit');
	await knex.schema.alterTable('stores', (t) => {
		t.dropColumn('tire_age_limit_years');
	});
	await knex.raw(`ALTER TABLE wheel_records DROP CONSTRAINT IF EXISTS wheel_records_damage_object,
		DROP CONSTRAINT IF EXISTS wheel_records_match_mount`);
	await knex.schema.alterTable('wheel_records', (t) => {
		t.dropColumn('damage');
		t.dropColumn('match_mount_deg');
	});
	await knex.schema.dropTable('bay_claims');
}

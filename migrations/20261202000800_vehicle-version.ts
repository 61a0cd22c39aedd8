// Managers now edit the vehicle data (a form and CSV imports): a `version` guards concurrent edits, so a stale save
// gets 409 instead of silently overwriting someone else's change.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.alterTable('vehicles', (t) => {
		t.integer('version').notNullable().defaultTo(1);
	});
	await knex.raw('ALTER TABLE vehicles ADD CONSTRAINT vehicles_version_positive CHECK (version > 0)');
}

export async function down(knex: Knex): Promise<void> {
	await knex.raw('ALTER TABLE vehicles DROP CONSTRAINT IF EXISTS vehicles_version_positive');
	await knex.schema.alterTable('vehicles', (t) => {
		t.dropColumn('version');
	});
}

// The live floor: who is on each bay (a technician starts and finishes wheels in their own bay), and how far the
// events log has been pruned (a screen whose cursor is older than that must reload its snapshot).
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.alterTable('bays', (t) => {
		t.integer('tech_id').references('users.id').onDelete('SET NULL');
	});
	await knex.schema.alterTable('stores', (t) => {
		t.bigInteger('events_pruned_to').notNullable().defaultTo(0);
	});
	// A technician is on at most one bay at a time.
	await knex.raw('CREATE UNIQUE INDEX bays_one_bay_per_tech ON bays (tech_id) WHERE tech_id IS NOT NULL');
}

export async function down(knex: Knex): Promise<void> {
	await knex.raw('DROP INDEX IF EXISTS bays_one_bay_per_tech');
	await knex.schema.alterTable('stores', (t) => {
		t.dropColumn('events_pruned_to');
	});
	await knex.schema.alterTable('bays', (t) => {
		t.dropColumn('tech_id');
	});
}

// A store's customer-notice settings, and the indexes the outbox's readers need.
// `notices_enabled`: whether finishing a job writes the automatic notices (ready for pickup, re-torque reminder) for
// customers who opted in; a summary asked for at the counter is sent either way. `retorque_after_days`: when the
// re-torque reminder goes out after the job is done (0: no reminder). Re-checking lug torque after the first
// 50–100 miles (80–160 km) is common practice; most customers drive that far in a few days.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.alterTable('stores', (t) => {
		t.boolean('notices_enabled').notNullable().defaultTo(true);
		t.integer('retorque_after_days').notNullable().defaultTo(3);
	});
	await knex.raw(
		'ALTER TABLE stores ADD CONSTRAINT stores_retorque_after_days CHECK (retorque_after_days BETWEEN 0 AND 60)'
	);
	// The manager's outbox page reads a store's notices newest first; finishing a job looks for the job's notices.
	await knex.raw('CREATE INDEX outbox_store_newest ON outbox (store_id, id DESC)');
	await knex.raw('CREATE INDEX outbox_job ON outbox (job_id, kind)');
}

export async function down(knex: Knex): Promise<void> {
	await knex.raw('DROP INDEX IF EXISTS outbox_job');
	await knex.raw('DROP INDEX IF EXISTS outbox_store_newest');
	await knex.raw('ALTER TABLE stores DROP CONSTRAINT IF EXISTS stores_retorque_after_days');
	await knex.schema.alterTable('stores', (t) => {
		t.dropColumn('retorque_after_days');
		t.dropColumn('notices_enabled');
	});
}

// The manager's pages edit staff, bays, services and store settings with forms: a `version` on each guards
// concurrent edits, so a form saved over someone else's newer change is refused (409) instead of overwriting it.
import type { Knex } from 'knex';

const tables = ['users', 'bays', 'services', 'stores'] as const;

export async function up(knex: Knex): Promise<void> {
	for (const table of tables) {
		await knex.schema.alterTable(table, (t) => {
			t.integer('version').notNullable().defaultTo(1);
		});
		await knex.raw(`ALTER TABLE ?? ADD CONSTRAINT ?? CHECK (version > 0)`, [table, `${table}_version_positive`]);
	}
}

export async function down(knex: Knex): Promise<void> {
	for (const table of tables) {
		await knex.raw(`ALTER TABLE ?? DROP CONSTRAINT IF EXISTS ??`, [table, `${table}_version_positive`]);
		await knex.schema.alterTable(table, (t) => {
			t.dropColumn('version');
		});
	}
}

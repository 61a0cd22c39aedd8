// pg_trgm backs the fuzzy customer search (name, phone and plate fragments) of the command palette.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.raw('CREATE EXTENSION IF NOT EXISTS pg_trgm');
}

export async function down(knex: Knex): Promise<void> {
	await knex.raw('DROP EXTENSION IF EXISTS pg_trgm');
}

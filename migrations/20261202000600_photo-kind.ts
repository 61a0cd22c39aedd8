// What a photo shows: damage found, the finished work, or other work along the way (the default for an upload that
// does not say).
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.alterTable('photos', (t) => {
		t.text('kind').notNullable().defaultTo('work');
	});
	await knex.raw(`ALTER TABLE photos ADD CONSTRAINT photos_kind CHECK (kind IN ('damage', 'finished', 'work'))`);
}

export async function down(knex: Knex): Promise<void> {
	await knex.raw('ALTER TABLE photos DROP CONSTRAINT IF EXISTS photos_kind');
	await knex.schema.alterTable('photos', (t) => {
		t.dropColumn('kind');
	});
}

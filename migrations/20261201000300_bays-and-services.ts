// The store's bays and the services it sells, with the standard minutes the queue forecast uses.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('bays', (t) => {
		t.increments('id');
		t.integer('store_id').notNullable().references('stores.id').onDelete('CASCADE');
		t.text('code').notNullable();
		t.text('name').notNullable();
		t.integer('position').notNullable();
		t.boolean('active').notNullable().defaultTo(true);
		t.timestamps(true, true);
		t.unique(['store_id', 'code']);
		t.index(['store_id', 'position']);
	});
	await knex.raw(`ALTER TABLE bays ADD CONSTRAINT bays_code_format CHECK (code ~ '^[A-Za-z0-9-]{1,12}$')`);

	await knex.schema.createTable('services', (t) => {
		t.increments('id');
		t.integer('store_id').notNullable().references('stores.id').onDelete('CASCADE');
		t.text('code').notNullable();
		t.text('name').notNullable();
		t.decimal('standard_minutes', 6, 2).notNullable();
		t.text('per').notNullable().defaultTo('wheel');
		t.boolean('needs_balance').notNullable().defaultTo(false);
		t.boolean('active').notNullable().defaultTo(true);
		t.integer('position').notNullable().defaultTo(0);
		t.timestamps(true, true);
		t.unique(['store_id', 'code']);
	});
	await knex.raw(`ALTER TABLE services ADD CONSTRAINT services_per_check CHECK (per IN ('wheel', 'job')),
		ADD CONSTRAINT services_minutes_check CHECK (standard_minutes >= 0)`);
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('services');
	await knex.schema.dropTable('bays');
}

// The live feed and its replay log, notices waiting to be sent, and who changed what.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('events', (t) => {
		t.bigIncrements('id');
		t.integer('store_id').notNullable().references('stores.id').onDelete('CASCADE');
		t.text('type').notNullable();
		t.text('entity').notNullable();
		t.integer('entity_id');
		t.jsonb('payload').notNullable().defaultTo('{}');
		t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
		t.index(['store_id', 'id']);
		t.index(['created_at']);
	});

	await knex.schema.createTable('outbox', (t) => {
		t.bigIncrements('id');
		t.integer('store_id').notNullable().references('stores.id').onDelete('CASCADE');
		t.text('kind').notNullable();
		t.integer('job_id').references('jobs.id').onDelete('SET NULL');
		t.text('to_name').notNullable().defaultTo('');
		t.text('to_address').notNullable();
		t.jsonb('payload').notNullable().defaultTo('{}');
		t.timestamp('send_after', { useTz: true }).notNullable().defaultTo(knex.fn.now());
		t.integer('attempts').notNullable().defaultTo(0);
		t.text('last_error');
		t.timestamp('sent_at', { useTz: true });
		t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
	});
	await knex.raw(`ALTER TABLE outbox ADD CONSTRAINT outbox_kind CHECK (kind IN ('ready', 'retorque', 'summary')),
		ADD CONSTRAINT outbox_attempts CHECK (attempts >= 0)`);
	await knex.raw('CREATE INDEX outbox_due ON outbox (send_after) WHERE sent_at IS NULL');

	await knex.schema.createTable('audit', (t) => {
		t.bigIncrements('id');
		t.integer('store_id').references('stores.id').onDelete('CASCADE');
		t.integer('user_id').references('users.id').onDelete('SET NULL');
		t.text('action').notNullable();
		t.text('entity').notNullable();
		t.integer('entity_id');
		t.jsonb('detail').notNullable().defaultTo('{}');
		t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
		t.index(['store_id', 'created_at']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('audit');
	await knex.schema.dropTable('outbox');
	await knex.schema.dropTable('events');
}

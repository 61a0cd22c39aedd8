// Stores, their staff, and the sign-in failure counter (kept here so it holds across app instances).
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('stores', (t) => {
		t.increments('id');
		t.text('slug').notNullable().unique();
		t.text('name').notNullable();
		t.text('timezone').notNullable().defaultTo('UTC');
		t.text('phone').notNullable().defaultTo('');
		t.text('email').notNullable().defaultTo('');
		t.text('address').notNullable().defaultTo('');
		// Display units only; every stored measurement is SI.
		t.jsonb('units')
			.notNullable()
			.defaultTo(
				JSON.stringify({ pressure: 'psi', mass: 'oz', torque: 'lbf.ft', length: 'in', tread: 'in32', force: 'lbf' })
			);
		t.decimal('target_min_per_wheel', 6, 2).notNullable().defaultTo(12);
		t.decimal('force_variation_limit_n', 8, 2).notNullable().defaultTo(111.2);
		t.jsonb('weight_rules').notNullable().defaultTo(JSON.stringify({ incrementG: 5, leadAllowed: false }));
		t.integer('next_job_number').notNullable().defaultTo(1);
		t.timestamps(true, true);
	});
	await knex.raw(`ALTER TABLE stores ADD CONSTRAINT stores_target_positive CHECK (target_min_per_wheel > 0),
		ADD CONSTRAINT stores_fv_limit_positive CHECK (force_variation_limit_n > 0),
		ADD CONSTRAINT stores_next_job_number_positive CHECK (next_job_number > 0)`);

	await knex.schema.createTable('users', (t) => {
		t.increments('id');
		t.integer('store_id').notNullable().references('stores.id').onDelete('RESTRICT');
		t.text('name').notNullable();
		t.text('email').notNullable();
		t.text('role').notNullable();
		t.text('password_hash').notNullable();
		t.text('pin_hash');
		t.boolean('active').notNullable().defaultTo(true);
		// Bumped on disable, role change or password reset: a JWT carrying an older value is refused.
		t.integer('session_version').notNullable().defaultTo(1);
		t.timestamps(true, true);
		t.index(['store_id']);
	});
	await knex.raw(`ALTER TABLE users ADD CONSTRAINT users_role_check CHECK (role IN ('writer', 'lead', 'tech', 'manager'))`);
	await knex.raw('CREATE UNIQUE INDEX users_email_unique ON users (lower(email))');

	await knex.schema.createTable('signin_failures', (t) => {
		// The lower-cased e-mail as typed, whether or not an account has it, so the counter reveals nothing.
		t.text('account_key').primary();
		t.integer('failures').notNullable().defaultTo(0);
		t.timestamp('first_failed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
		t.timestamp('locked_until', { useTz: true });
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('signin_failures');
	await knex.schema.dropTable('users');
	await knex.schema.dropTable('stores');
}

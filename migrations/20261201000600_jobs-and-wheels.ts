// The floor: jobs, the services on them, and their wheels in bay queues. `version` guards concurrent edits.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('jobs', (t) => {
		t.increments('id');
		t.integer('store_id').notNullable().references('stores.id').onDelete('CASCADE');
		t.integer('number').notNullable();
		t.integer('customer_id').notNullable().references('customers.id').onDelete('RESTRICT');
		t.integer('customer_vehicle_id').references('customer_vehicles.id').onDelete('SET NULL');
		t.integer('vehicle_id').references('vehicles.id').onDelete('SET NULL');
		t.text('kind').notNullable();
		t.text('state').notNullable().defaultTo('waiting');
		t.timestamp('promised_at', { useTz: true }).notNullable();
		t.integer('priority').notNullable().defaultTo(0);
		t.text('notes').notNullable().defaultTo('');
		t.integer('created_by').references('users.id').onDelete('SET NULL');
		t.integer('version').notNullable().defaultTo(1);
		t.timestamp('started_at', { useTz: true });
		t.timestamp('done_at', { useTz: true });
		t.timestamp('collected_at', { useTz: true });
		t.timestamps(true, true);
		t.unique(['store_id', 'number']);
		t.index(['store_id', 'state', 'promised_at']);
		t.index(['customer_id']);
	});
	await knex.raw(`ALTER TABLE jobs
		ADD CONSTRAINT jobs_kind_check CHECK (kind IN ('waiter', 'drop_off')),
		ADD CONSTRAINT jobs_state_check CHECK (state IN ('waiting', 'in_progress', 'done', 'collected', 'cancelled')),
		ADD CONSTRAINT jobs_number_positive CHECK (number > 0),
		ADD CONSTRAINT jobs_version_positive CHECK (version > 0),
		ADD CONSTRAINT jobs_started_has_time CHECK (state <> 'in_progress' OR started_at IS NOT NULL),
		ADD CONSTRAINT jobs_done_has_time CHECK (state NOT IN ('done', 'collected') OR done_at IS NOT NULL),
		ADD CONSTRAINT jobs_collected_has_time CHECK (state <> 'collected' OR collected_at IS NOT NULL)`);

	await knex.schema.createTable('job_services', (t) => {
		t.integer('job_id').notNullable().references('jobs.id').onDelete('CASCADE');
		t.integer('service_id').notNullable().references('services.id').onDelete('RESTRICT');
		t.primary(['job_id', 'service_id']);
	});

	await knex.schema.createTable('wheels', (t) => {
		t.increments('id');
		t.integer('job_id').notNullable().references('jobs.id').onDelete('CASCADE');
		t.text('position').notNullable();
		// RESTRICT: a bay holding wheels is taken out of service (`active`), not deleted.
		t.integer('bay_id').references('bays.id').onDelete('RESTRICT');
		t.integer('queue_position');
		t.text('state').notNullable().defaultTo('queued');
		t.integer('tech_id').references('users.id').onDelete('SET NULL');
		t.timestamp('started_at', { useTz: true });
		t.timestamp('finished_at', { useTz: true });
		t.integer('version').notNullable().defaultTo(1);
		t.timestamps(true, true);
		t.unique(['job_id', 'position']);
		t.index(['job_id']);
	});
	await knex.raw(`ALTER TABLE wheels
		ADD CONSTRAINT wheels_position_check CHECK (position IN ('LF', 'RF', 'LR', 'RR', 'SP')),
		ADD CONSTRAINT wheels_state_check CHECK (state IN ('queued', 'working', 'done')),
		ADD CONSTRAINT wheels_version_positive CHECK (version > 0),
		ADD CONSTRAINT wheels_queue_needs_bay CHECK (bay_id IS NOT NULL OR queue_position IS NULL),
		ADD CONSTRAINT wheels_working_in_bay CHECK (state <> 'working' OR (bay_id IS NOT NULL AND started_at IS NOT NULL)),
		ADD CONSTRAINT wheels_done_has_times CHECK (state <> 'done' OR (started_at IS NOT NULL AND finished_at IS NOT NULL AND finished_at >= started_at))`);
	// Two wheels can never share a place in a bay's queue. Deferred, so a reorder can swap places inside one transaction.
	await knex.raw(
		'ALTER TABLE wheels ADD CONSTRAINT wheels_queue_place_unique UNIQUE (bay_id, queue_position) DEFERRABLE INITIALLY DEFERRED'
	);
	await knex.raw('CREATE INDEX wheels_finished_at ON wheels (finished_at) WHERE finished_at IS NOT NULL');
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('wheels');
	await knex.schema.dropTable('job_services');
	await knex.schema.dropTable('jobs');
}

// What was done to each wheel, kept to answer a comeback, and the photos taken (objects live in S3 storage).
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('wheel_records', (t) => {
		t.increments('id');
		t.integer('wheel_id').notNullable().unique().references('wheels.id').onDelete('CASCADE');
		t.decimal('tread_depth_mm', 5, 2);
		t.text('dot_code');
		t.decimal('pressure_set_kpa', 6, 1);
		// [{ plane: 'inner' | 'outer', type: 'clip' | 'adhesive', grams, angleDeg }]
		t.jsonb('weights').notNullable().defaultTo('[]');
		t.decimal('force_before_n', 8, 2);
		t.decimal('force_after_n', 8, 2);
		t.boolean('match_mounted').notNullable().defaultTo(false);
		t.decimal('torque_applied_nm', 6, 1);
		t.text('notes').notNullable().defaultTo('');
		t.integer('recorded_by').references('users.id').onDelete('SET NULL');
		t.integer('version').notNullable().defaultTo(1);
		t.timestamps(true, true);
	});
	await knex.raw(`ALTER TABLE wheel_records
		ADD CONSTRAINT wheel_records_tread CHECK (tread_depth_mm IS NULL OR tread_depth_mm BETWEEN 0 AND 40),
		ADD CONSTRAINT wheel_records_pressure CHECK (pressure_set_kpa IS NULL OR pressure_set_kpa BETWEEN 0 AND 1200),
		ADD CONSTRAINT wheel_records_forces CHECK ((force_before_n IS NULL OR force_before_n >= 0) AND (force_after_n IS NULL OR force_after_n >= 0)),
		ADD CONSTRAINT wheel_records_torque CHECK (torque_applied_nm IS NULL OR torque_applied_nm BETWEEN 0 AND 1000),
		ADD CONSTRAINT wheel_records_weights_array CHECK (jsonb_typeof(weights) = 'array')`);

	await knex.schema.createTable('photos', (t) => {
		t.increments('id');
		t.integer('store_id').notNullable().references('stores.id').onDelete('CASCADE');
		t.integer('job_id').references('jobs.id').onDelete('CASCADE');
		t.integer('wheel_id').references('wheels.id').onDelete('CASCADE');
		t.text('object_key').notNullable().unique();
		t.text('content_type').notNullable();
		t.integer('size_bytes').notNullable();
		t.integer('uploaded_by').references('users.id').onDelete('SET NULL');
		t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
		t.index(['job_id']);
		t.index(['wheel_id']);
	});
	await knex.raw(`ALTER TABLE photos
		ADD CONSTRAINT photos_subject CHECK (job_id IS NOT NULL OR wheel_id IS NOT NULL),
		ADD CONSTRAINT photos_type CHECK (content_type IN ('image/jpeg', 'image/png', 'image/webp')),
		ADD CONSTRAINT photos_size CHECK (size_bytes > 0)`);
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('photos');
	await knex.schema.dropTable('wheel_records');
}

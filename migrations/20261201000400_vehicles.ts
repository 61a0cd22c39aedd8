// The wheel-fact data every screen reads. Shared by all stores of a chain; SI units throughout.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('vehicles', (t) => {
		t.increments('id');
		t.integer('year_from').notNullable();
		t.integer('year_to').notNullable();
		t.text('make').notNullable();
		t.text('model').notNullable();
		t.text('trim').notNullable().defaultTo('');
		t.integer('stud_count').notNullable();
		t.decimal('bolt_circle_mm', 6, 2).notNullable();
		t.decimal('centre_bore_mm', 6, 2).notNullable();
		t.text('thread').notNullable();
		t.decimal('hex_mm', 5, 2).notNullable();
		t.decimal('torque_nm', 6, 1).notNullable();
		t.text('tire_front').notNullable();
		t.text('tire_rear').notNullable();
		t.decimal('placard_front_kpa', 6, 1).notNullable();
		t.decimal('placard_rear_kpa', 6, 1).notNullable();
		t.text('tpms').notNullable().defaultTo('direct');
		t.text('notes').notNullable().defaultTo('');
		t.text('source').notNullable().defaultTo('');
		t.timestamps(true, true);
		t.unique(['make', 'model', 'trim', 'year_from', 'year_to']);
	});
	await knex.raw(`ALTER TABLE vehicles
		ADD CONSTRAINT vehicles_years CHECK (year_from BETWEEN 1900 AND 2100 AND year_to BETWEEN year_from AND 2100),
		ADD CONSTRAINT vehicles_studs CHECK (stud_count BETWEEN 3 AND 10),
		ADD CONSTRAINT vehicles_bolt_circle CHECK (bolt_circle_mm BETWEEN 50 AND 300),
		ADD CONSTRAINT vehicles_centre_bore CHECK (centre_bore_mm BETWEEN 30 AND 220),
		ADD CONSTRAINT vehicles_hex CHECK (hex_mm BETWEEN 10 AND 50),
		ADD CONSTRAINT vehicles_torque CHECK (torque_nm BETWEEN 20 AND 1000),
		ADD CONSTRAINT vehicles_placard CHECK (placard_front_kpa BETWEEN 100 AND 1000 AND placard_rear_kpa BETWEEN 100 AND 1000),
		ADD CONSTRAINT vehicles_tpms CHECK (tpms IN ('direct', 'indirect', 'none'))`);
	await knex.raw('CREATE INDEX vehicles_make_model_trgm ON vehicles USING gin ((make || \' \' || model || \' \' || trim) gin_trgm_ops)');
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('vehicles');
}

// Customers of a store and the vehicles they bring; trigram indexes serve the palette's customer search.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('customers', (t) => {
		t.increments('id');
		t.integer('store_id').notNullable().references('stores.id').onDelete('CASCADE');
		t.text('name').notNullable();
		t.text('phone').notNullable().defaultTo('');
		t.text('email').notNullable().defaultTo('');
		// Notices go only to customers who asked for them.
		t.boolean('notify_email').notNullable().defaultTo(false);
		t.text('notes').notNullable().defaultTo('');
		t.timestamps(true, true);
		t.index(['store_id']);
	});
	await knex.raw('CREATE INDEX customers_name_trgm ON customers USING gin (name gin_trgm_ops)');
	await knex.raw('CREATE INDEX customers_phone_trgm ON customers USING gin (phone gin_trgm_ops)');

	await knex.schema.createTable('customer_vehicles', (t) => {
		t.increments('id');
		t.integer('customer_id').notNullable().references('customers.id').onDelete('CASCADE');
		t.integer('vehicle_id').references('vehicles.id').onDelete('SET NULL');
		t.text('plate').notNullable().defaultTo('');
		t.text('vin').notNullable().defaultTo('');
		t.text('colour').notNullable().defaultTo('');
		t.integer('odometer_km');
		t.timestamps(true, true);
		t.index(['customer_id']);
	});
	await knex.raw(`ALTER TABLE customer_vehicles ADD CONSTRAINT customer_vehicles_odometer CHECK (odometer_km IS NULL OR odometer_km >= 0),
		ADD CONSTRAINT customer_vehicles_vin CHECK (vin = '' OR vin ~ '^[A-HJ-NPR-Z0-9]{17}$')`);
	await knex.raw('CREATE INDEX customer_vehicles_plate_trgm ON customer_vehicles USING gin (plate gin_trgm_ops)');
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('customer_vehicles');
	await knex.schema.dropTable('customers');
}

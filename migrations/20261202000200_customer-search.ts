// Customer search from the palette and intake: phone fragments typed as bare digits ("5550148") and plates typed
// without their space ("esy104") match through expression indexes on the normalised forms.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.raw(`CREATE INDEX customers_phone_digits_trgm ON customers USING gin ((regexp_replace(phone, '\\D', '', 'g')) gin_trgm_ops)`);
	await knex.raw(
		`CREATE INDEX customer_vehicles_plate_norm_trgm ON customer_vehicles USING gin ((upper(regexp_replace(plate, '\\s', '', 'g'))) gin_trgm_ops)`
	);
}

export async function down(knex: Knex): Promise<void> {
	await knex.raw('DROP INDEX IF EXISTS customer_vehicles_plate_norm_trgm');
	await knex.raw('DROP INDEX IF EXISTS customers_phone_digits_trgm');
}

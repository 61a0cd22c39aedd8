// Reference data shared by the demo and bench seeds: a store, its staff, bays, services, the vehicle data and the
// customers. Each helper inserts only what is missing, keyed on the schema's natural keys, so a second run is a no-op.
import { hash } from '@node-rs/argon2';
import type { Knex } from 'knex';
import { insertRows, reserveIds } from './bulk';
import { vehicleKey, type InventedCustomer, type VehicleRecord } from './invented';

export interface StoreSpec {
	slug: string;
	name: string;
	timezone: string;
	phone: string;
	email: string;
	address: string;
	targetMinPerWheel: number;
}

export async function ensureStore(db: Knex, spec: StoreSpec): Promise<number> {
	await db('stores')
		.insert({
			slug: spec.slug,
			name: spec.name,
			timezone: spec.timezone,
			phone: spec.phone,
			email: spec.email,
			address: spec.address,
			units: JSON.stringify({
				pressure: 'psi',
				mass: 'oz',
				torque: 'lbf.ft',
				length: 'in',
				tread: 'in32',
				force: 'lbf'
			}),
			target_min_per_wheel: spec.targetMinPerWheel
		})
		.onConflict('slug')
		.ignore();
	const row = await db('stores').where({ slug: spec.slug }).first('id');
	return row.id as number;
}

export interface StaffSpec {
	name: string;
	email: string;
	role: 'writer' | 'lead' | 'tech' | 'manager';
	password: string;
	pin?: string;
}

/** Adds the accounts whose e-mail (case-insensitive) is not taken yet. Returns every listed account's id by e-mail. */
export async function ensureStaff(
	db: Knex,
	storeId: number,
	staff: readonly StaffSpec[]
): Promise<Map<string, number>> {
	const emails = staff.map((s) => s.email.toLowerCase());
	const existing = await db('users')
		.whereRaw('lower(email) = any(?)', [emails])
		.select('id', db.raw('lower(email) AS email'));
	const have = new Set(existing.map((r: { email: string }) => r.email));
	const missing = staff.filter((s) => !have.has(s.email.toLowerCase()));
	if (missing.length) {
		// Argon2 is slow on purpose: hash each distinct secret once, and only when an account needs it.
		const secrets = [...new Set(missing.flatMap((s) => (s.pin ? [s.password, s.pin] : [s.password])))];
		const hashes = new Map(await Promise.all(secrets.map(async (secret) => [secret, await hash(secret)] as const)));
		await db('users').insert(
			missing.map((s) => ({
				store_id: storeId,
				name: s.name,
				email: s.email,
				role: s.role,
				password_hash: hashes.get(s.password),
				pin_hash: s.pin ? hashes.get(s.pin) : null
			}))
		);
	}
	const rows = await db('users')
		.whereRaw('lower(email) = any(?)', [emails])
		.select('id', db.raw('lower(email) AS email'));
	return new Map(rows.map((r: { id: number; email: string }) => [r.email, r.id]));
}

/** Bays B1…Bn in floor order; returns their ids in that order. */
export async function ensureBays(db: Knex, storeId: number, count: number): Promise<number[]> {
	const bays = Array.from({ length: count }, (_, i) => ({
		store_id: storeId,
		code: `B${i + 1}`,
		name: `Bay ${i + 1}`,
		position: i + 1
	}));
	await db('bays').insert(bays).onConflict(['store_id', 'code']).ignore();
	const rows = await db('bays')
		.where({ store_id: storeId })
		.whereIn(
			'code',
			bays.map((b) => b.code)
		)
		.select('id', 'code');
	const byCode = new Map(rows.map((r: { id: number; code: string }) => [r.code, r.id]));
	return bays.map((b) => byCode.get(b.code) as number);
}

export interface ServiceSpec {
	code: string;
	name: string;
	standard_minutes: number;
	per: 'wheel' | 'job';
	needs_balance: boolean;
}

/** What a store sells, in plain trade words, with the standard minutes the queue forecast starts from. */
export const SERVICES: readonly ServiceSpec[] = [
	{ code: 'mount-balance', name: 'Mount and balance', standard_minutes: 12, per: 'wheel', needs_balance: true },
	{
		code: 'changeover',
		name: 'Seasonal changeover (mounted set)',
		standard_minutes: 6,
		per: 'wheel',
		needs_balance: false
	},
	{
		code: 'flat-repair',
		name: 'Flat repair (plug and patch)',
		standard_minutes: 18,
		per: 'wheel',
		needs_balance: true
	},
	{ code: 'rotation', name: 'Rotation', standard_minutes: 16, per: 'job', needs_balance: false },
	{ code: 'tpms', name: 'TPMS sensor service', standard_minutes: 6, per: 'wheel', needs_balance: false },
	{ code: 'force-check', name: 'Force variation check', standard_minutes: 8, per: 'wheel', needs_balance: true },
	{ code: 'retorque', name: 'Torque re-check', standard_minutes: 8, per: 'job', needs_balance: false }
];

export interface ServiceRow extends ServiceSpec {
	id: number;
}

export async function ensureServices(db: Knex, storeId: number): Promise<ServiceRow[]> {
	await db('services')
		.insert(SERVICES.map((s, i) => ({ ...s, store_id: storeId, position: i + 1 })))
		.onConflict(['store_id', 'code'])
		.ignore();
	const rows = await db('services')
		.where({ store_id: storeId })
		.whereIn(
			'code',
			SERVICES.map((s) => s.code)
		)
		.select('id', 'code');
	const byCode = new Map(rows.map((r: { id: number; code: string }) => [r.code, r.id]));
	return SERVICES.map((s) => ({ ...s, id: byCode.get(s.code) as number }));
}

const VEHICLE_COLUMNS = {
	year_from: 'int',
	year_to: 'int',
	make: 'text',
	model: 'text',
	trim: 'text',
	stud_count: 'int',
	bolt_circle_mm: 'numeric',
	centre_bore_mm: 'numeric',
	thread: 'text',
	hex_mm: 'numeric',
	torque_nm: 'numeric',
	tire_front: 'text',
	tire_rear: 'text',
	placard_front_kpa: 'numeric',
	placard_rear_kpa: 'numeric',
	tpms: 'text',
	notes: 'text',
	source: 'text'
} as const;

/** Adds the records whose (make, model, trim, years) is new; returns the id of every given record, in order. */
export async function ensureVehicles(db: Knex, records: readonly VehicleRecord[]): Promise<number[]> {
	await insertRows(db, 'vehicles', VEHICLE_COLUMNS, records as unknown as Record<string, unknown>[], {
		onConflict: 'ON CONFLICT (make, model, trim, year_from, year_to) DO NOTHING'
	});
	const makes = [...new Set(records.map((r) => r.make))];
	const rows: { id: number; make: string; model: string; trim: string; year_from: number; year_to: number }[] =
		await db('vehicles').whereIn('make', makes).select('id', 'make', 'model', 'trim', 'year_from', 'year_to');
	const byKey = new Map(rows.map((r) => [vehicleKey(r), r.id]));
	return records.map((r) => byKey.get(vehicleKey(r)) as number);
}

/** Writes customers and their vehicles with reserved ids; returns the customer ids and customer-vehicle ids in order. */
export async function insertCustomers(
	db: Knex,
	storeId: number,
	customers: readonly InventedCustomer[],
	vehicleIds: readonly number[]
): Promise<{ customerIds: number[]; customerVehicleIds: number[][] }> {
	const customerIds = await reserveIds(db, 'customers', customers.length);
	const vehicleCount = customers.reduce((n, c) => n + c.vehicles.length, 0);
	const cvIds = await reserveIds(db, 'customer_vehicles', vehicleCount);
	const customerRows = customers.map((c, i) => ({
		id: customerIds[i],
		store_id: storeId,
		name: c.name,
		phone: c.phone,
		email: c.email,
		notify_email: c.notify_email,
		notes: c.notes
	}));
	const customerVehicleIds: number[][] = [];
	const cvRows: Record<string, unknown>[] = [];
	customers.forEach((c, i) => {
		const ids: number[] = [];
		for (const v of c.vehicles) {
			const id = cvIds[cvRows.length];
			ids.push(id);
			cvRows.push({
				id,
				customer_id: customerIds[i],
				vehicle_id: vehicleIds[v.vehicleIndex],
				plate: v.plate,
				vin: v.vin,
				colour: v.colour,
				odometer_km: v.odometer_km
			});
		}
		customerVehicleIds.push(ids);
	});
	await insertRows(
		db,
		'customers',
		{ id: 'int', store_id: 'int', name: 'text', phone: 'text', email: 'text', notify_email: 'bool', notes: 'text' },
		customerRows
	);
	await insertRows(
		db,
		'customer_vehicles',
		{
			id: 'int',
			customer_id: 'int',
			vehicle_id: 'int',
			plate: 'text',
			vin: 'text',
			colour: 'text',
			odometer_km: 'int'
		},
		cvRows
	);
	return { customerIds, customerVehicleIds };
}

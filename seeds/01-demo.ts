// Demo data for trying Lugline and for the tests: one invented store ("Tessel Bend", a town that does not exist)
// with its staff, 8 bays, services, ~300 invented vehicle records, ~2,000 invented customers with their vehicles,
// and a rush morning of ~40 jobs across every job and wheel state. Nothing here is real: the makes and models are
// coined, the wheel facts are not for service use, phone numbers sit in the 555-01xx range kept for fiction, and
// e-mail addresses use the reserved .test domain.
//
// Sign-ins: the four accounts of seeds/demo-accounts.json, plus more invented staff who share the password
// `demo-staff-1` (tech2…tech8@demo.lugline.test, writer2@demo.lugline.test). Technicians' PINs follow their number:
// tech@ (Oskar Belmonte) is 1111, tech2@ is 2222, … tech8@ is 8888.
//
// Idempotent: reference data is added only where missing (store by slug, users by e-mail, bays and services by code,
// vehicles by their unique key, customers only when the store has none). The rush morning is rebuilt only when the
// store has no job created today in its own timezone, so a second run on the same day changes nothing.
import { readFileSync } from 'node:fs';
import type { Knex } from 'knex';
import { z } from 'zod';
import { planFloor, tally, writeFloor, type FloorBay, type FloorVehicle } from './lib/floor';
import { demoVehicles, inventCustomers, isLightTruckSize } from './lib/invented';
import { Rng } from './lib/prng';
import {
	ensureBays,
	ensureServices,
	ensureStaff,
	ensureStore,
	ensureVehicles,
	insertCustomers,
	type StaffSpec
} from './lib/reference';

const SEED = 20261201;
const CUSTOMER_COUNT = 2000;
const EXTRA_STAFF_PASSWORD = 'demo-staff-1';

const accountsSchema = z
	.array(
		z.object({
			role: z.enum(['writer', 'lead', 'tech', 'manager']),
			name: z.string().min(1),
			email: z.email(),
			password: z.string().min(8)
		})
	)
	.min(1);

const EXTRA_STAFF: readonly { name: string; role: StaffSpec['role'] }[] = [
	{ name: 'Ines Varga', role: 'tech' },
	{ name: 'Callum Ferreira', role: 'tech' },
	{ name: 'Hedda Marsh', role: 'tech' },
	{ name: 'Tobias Okonkwo', role: 'tech' },
	{ name: 'Yusuf Albrecht', role: 'tech' },
	{ name: 'Greta Solberg', role: 'tech' },
	{ name: 'Mateo Lindgren', role: 'tech' },
	{ name: 'Ruth Kowalczyk', role: 'writer' }
];

function demoStaff(): StaffSpec[] {
	const accounts = accountsSchema.parse(
		JSON.parse(readFileSync(new URL('./demo-accounts.json', import.meta.url), 'utf8'))
	);
	const staff: StaffSpec[] = accounts.map((a) => ({ ...a }));
	const counts = new Map<string, number>();
	for (const a of staff) counts.set(a.role, (counts.get(a.role) ?? 0) + 1);
	for (const extra of EXTRA_STAFF) {
		const n = (counts.get(extra.role) ?? 0) + 1;
		counts.set(extra.role, n);
		staff.push({ ...extra, email: `${extra.role}${n}@demo.lugline.test`, password: EXTRA_STAFF_PASSWORD });
	}
	let tech = 0;
	for (const s of staff) if (s.role === 'tech') s.pin = String(++tech).repeat(4);
	return staff;
}

interface Clock {
	now: Date;
	minutes_today: number;
	next_job_number: number;
	force_variation_limit_n: string;
	has_job_today: boolean;
}

export async function seed(knex: Knex): Promise<void> {
	const started = performance.now();
	const done: string[] = [];
	await knex.transaction(async (trx) => {
		// Two app instances starting together would otherwise both decide the rush morning is missing.
		await trx.raw(`SELECT pg_advisory_xact_lock(hashtext('lugline demo seed'))`);
		const rng = new Rng(SEED);
		const storeId = await ensureStore(trx, {
			slug: 'demo',
			name: 'Tessel Bend Tire & Wheel (demo)',
			timezone: 'America/Winnipeg',
			phone: '204-555-0100',
			email: 'counter@demo.lugline.test',
			address: '12 Kiln Street, Tessel Bend (an invented town)',
			targetMinPerWheel: 12
		});
		const staff = demoStaff();
		const userIds = await ensureStaff(trx, storeId, staff);
		const idOf = (s: StaffSpec) => userIds.get(s.email.toLowerCase()) as number;
		const bayIds = await ensureBays(trx, storeId, 8);
		const services = await ensureServices(trx, storeId);
		const vehicles = demoVehicles(rng.fork('vehicles'));
		const vehicleIds = await ensureVehicles(trx, vehicles);

		if (!(await trx('customers').where({ store_id: storeId }).first('id'))) {
			const customers = inventCustomers(rng.fork('customers'), CUSTOMER_COUNT, vehicles.length);
			await insertCustomers(trx, storeId, customers, vehicleIds);
			done.push(`${customers.length} customers`);
		}

		const { rows } = await trx.raw<{ rows: Clock[] }>(
			`SELECT now() AS now,
				extract(epoch FROM now() - (date_trunc('day', now() AT TIME ZONE s.timezone) AT TIME ZONE s.timezone)) / 60 AS minutes_today,
				s.next_job_number, s.force_variation_limit_n,
				EXISTS (SELECT 1 FROM jobs j WHERE j.store_id = s.id
					AND j.created_at >= date_trunc('day', now() AT TIME ZONE s.timezone) AT TIME ZONE s.timezone) AS has_job_today
			FROM stores s WHERE s.id = ?`,
			[storeId]
		);
		const clock = rows[0];
		if (clock.has_job_today) return;

		// A new day: the floor of an earlier day goes (its wheels, services and records follow by cascade).
		await trx('jobs').where({ store_id: storeId }).delete();
		const pool: FloorVehicle[] = (
			await trx('customer_vehicles as cv')
				.join('customers as c', 'c.id', 'cv.customer_id')
				.leftJoin('vehicles as v', 'v.id', 'cv.vehicle_id')
				.where('c.store_id', storeId)
				.orderBy('cv.id')
				.select(
					'cv.id',
					'cv.customer_id',
					'cv.vehicle_id',
					'v.torque_nm',
					'v.placard_front_kpa',
					'v.placard_rear_kpa',
					'v.tire_front'
				)
		).map((r: Record<string, string | number | null>) => ({
			customerId: Number(r.customer_id),
			customerVehicleId: Number(r.id),
			vehicleId: r.vehicle_id === null ? null : Number(r.vehicle_id),
			torqueNm: r.torque_nm === null ? null : Number(r.torque_nm),
			placardFrontKpa: r.placard_front_kpa === null ? null : Number(r.placard_front_kpa),
			placardRearKpa: r.placard_rear_kpa === null ? null : Number(r.placard_rear_kpa),
			lightTruck: isLightTruckSize(String(r.tire_front ?? ''))
		}));
		const techs = staff.filter((s) => s.role === 'tech').map(idOf);
		// B8's technician went on a break twenty minutes ago: one idle bay, as on any real morning.
		const bays: FloorBay[] = bayIds.map((id, i) => ({
			id,
			techId: techs[i % techs.length],
			closesAtMin: i === 7 ? -20 : undefined
		}));
		const jobs = planFloor(
			{
				rng: rng.fork('rush morning'),
				jobCount: 40,
				spanMin: 140,
				horizonMin: 30,
				cancelledCount: 3,
				bays,
				services,
				vehicles: pool,
				writerIds: staff.filter((s) => s.role === 'writer' || s.role === 'lead').map(idOf),
				recordShare: 0.6,
				forceLimitN: Number(clock.force_variation_limit_n)
			},
			clock.now
		);
		const counts = tally(jobs);
		const missing = [
			...Object.entries(counts.jobs).filter(([, n]) => n === 0),
			...Object.entries(counts.wheels).filter(([, n]) => n === 0)
		].map(([state]) => state);
		if (missing.length)
			throw new Error(`the demo rush morning has no ${missing.join(', ')}: adjust planFloor's options`);

		const earliest = Math.min(...jobs.map((j) => j.createdMin));
		const available = Number(clock.minutes_today) - 1;
		const scale = available >= -earliest ? 1 : Math.max(0, available / -earliest);
		await writeFloor(trx, storeId, clock.next_job_number, clock.now, scale, bays, jobs);
		await trx('stores')
			.where({ id: storeId })
			.update({ next_job_number: clock.next_job_number + jobs.length, updated_at: trx.fn.now() });
		done.push(
			`a rush morning of ${jobs.length} jobs (${Object.entries(counts.jobs)
				.map(([s, n]) => `${n} ${s}`)
				.join(', ')})`
		);
	});
	const seconds = ((performance.now() - started) / 1000).toFixed(1);
	console.log(`demo data: ${done.length ? `added ${done.join(' and ')}` : 'already in place'} (${seconds} s)`);
}

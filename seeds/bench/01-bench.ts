// Benchmark data, run by `npm run seed:bench` into its own database (never the app's): one invented store (slug
// `bench`) with 24 bays and their staff, 20,000+ invented vehicle records, 100,000 invented customers with their
// vehicles, and a floor with more than 1,000 wheels in play (queued or working in the bays), so the console's queries,
// the palette's fuzzy search and the live board can be measured at a size a busy chain would reach. Nothing in it is
// real and the vehicle data says so in its `source`.
//
// Staff sign in as <role><nn>@bench.lugline.test with the password `bench-staff-1`; technician nn has PIN 10nn.
//
// Idempotent by skipping: when the bench store exists the seed does nothing (`npm run seed:bench -- --fresh`
// rebuilds the database from scratch). Everything is written in one transaction, so a failed run leaves nothing.
import type { Knex } from 'knex';
import { planFloor, tally, writeFloor, type FloorBay, type FloorVehicle } from '../lib/floor';
import { benchVehicles, inventCustomers, isLightTruckSize } from '../lib/invented';
import { Rng } from '../lib/prng';
import {
	ensureBays,
	ensureServices,
	ensureStaff,
	ensureStore,
	ensureVehicles,
	insertCustomers,
	type StaffSpec
} from '../lib/reference';

const SEED = 20261202;
const VEHICLE_COUNT = 20_000;
const CUSTOMER_COUNT = 100_000;
const BAY_COUNT = 24;
const WHEELS_IN_PLAY = 1_000;
const PASSWORD = 'bench-staff-1';

function benchStaff(): StaffSpec[] {
	const staff: StaffSpec[] = [];
	const add = (role: StaffSpec['role'], count: number) => {
		for (let n = 1; n <= count; n++) {
			const nn = String(n).padStart(2, '0');
			staff.push({
				name: `Bench ${role} ${nn}`,
				email: `${role}${nn}@bench.lugline.test`,
				role,
				password: PASSWORD,
				pin: role === 'tech' ? `10${nn}` : undefined
			});
		}
	};
	add('manager', 1);
	add('lead', 2);
	add('writer', 6);
	add('tech', BAY_COUNT);
	return staff;
}

export async function seed(knex: Knex): Promise<void> {
	const started = performance.now();
	const step = (label: string) =>
		console.log(`  ${label.padEnd(34)} ${((performance.now() - started) / 1000).toFixed(1)} s`);
	await knex.transaction(async (trx) => {
		await trx.raw(`SELECT pg_advisory_xact_lock(hashtext('lugline bench seed'))`);
		if (await trx('stores').where({ slug: 'bench' }).first('id')) {
			console.log('bench data already in place (npm run seed:bench -- --fresh rebuilds it)');
			return;
		}
		const rng = new Rng(SEED);
		const storeId = await ensureStore(trx, {
			slug: 'bench',
			name: 'Bench Tire Hall (invented benchmark data)',
			timezone: 'America/Winnipeg',
			phone: '204-555-0199',
			email: 'counter@bench.lugline.test',
			address: '1 Nowhere Road, an invented town',
			targetMinPerWheel: 12
		});
		const staff = benchStaff();
		const userIds = await ensureStaff(trx, storeId, staff);
		const idsOf = (role: StaffSpec['role']) =>
			staff.filter((s) => s.role === role).map((s) => userIds.get(s.email) as number);
		const bayIds = await ensureBays(trx, storeId, BAY_COUNT);
		const services = await ensureServices(trx, storeId);
		step('store, staff, bays, services');

		const vehicles = benchVehicles(rng.fork('vehicles'), VEHICLE_COUNT);
		const vehicleIds = await ensureVehicles(trx, vehicles);
		step(`${vehicles.length} vehicle records`);

		const customers = inventCustomers(rng.fork('customers'), CUSTOMER_COUNT, vehicles.length);
		const { customerIds, customerVehicleIds } = await insertCustomers(trx, storeId, customers, vehicleIds);
		step(`${customers.length} customers`);

		const pool: FloorVehicle[] = customers.flatMap((c, i) =>
			c.vehicles.map((v, k) => {
				const facts = vehicles[v.vehicleIndex];
				return {
					customerId: customerIds[i],
					customerVehicleId: customerVehicleIds[i][k],
					vehicleId: vehicleIds[v.vehicleIndex],
					torqueNm: facts.torque_nm,
					placardFrontKpa: facts.placard_front_kpa,
					placardRearKpa: facts.placard_rear_kpa,
					lightTruck: isLightTruckSize(facts.tire_front)
				};
			})
		);
		const bays: FloorBay[] = bayIds.map((id, i) => ({ id, techId: idsOf('tech')[i] }));
		const { rows } = await trx.raw<{ rows: { now: Date; next_job_number: number }[] }>(
			'SELECT now() AS now, next_job_number FROM stores WHERE id = ?',
			[storeId]
		);
		const jobs = planFloor(
			{
				rng: rng.fork('floor'),
				jobCount: 460,
				spanMin: 140,
				horizonMin: 720,
				cancelledCount: 10,
				bays,
				services,
				vehicles: pool,
				writerIds: [...idsOf('writer'), ...idsOf('lead')],
				recordShare: 0.5,
				forceLimitN: 111.2
			},
			rows[0].now
		);
		const inPlay = jobs.reduce(
			(n, j) => n + j.wheels.filter((w) => w.state !== 'done' && w.bayIndex !== null).length,
			0
		);
		if (inPlay < WHEELS_IN_PLAY)
			throw new Error(`the bench floor has ${inPlay} wheels in play; at least ${WHEELS_IN_PLAY} are wanted`);
		// The bench floor starts 140 minutes back and may cross midnight; it is never rebuilt by date, so no scaling.
		await writeFloor(trx, storeId, rows[0].next_job_number, rows[0].now, 1, bays, jobs);
		await trx('stores')
			.where({ id: storeId })
			.update({ next_job_number: rows[0].next_job_number + jobs.length });
		const counts = tally(jobs);
		step(`${jobs.length} jobs, ${inPlay} wheels in play in bays`);
		console.log(
			`  jobs: ${Object.entries(counts.jobs)
				.map(([s, n]) => `${n} ${s}`)
				.join(', ')}`
		);
	});
	// Fresh statistics, so the planner sees 100,000 customers rather than an empty table's guesses.
	await knex.raw('ANALYZE');
}

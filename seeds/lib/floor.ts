// A morning on the floor, invented by simulation: jobs arrive, the lead gives each one to the bay that frees up first,
// technicians work the wheels one after another, customers collect. Cutting the simulation at "now" puts jobs and
// wheels in every state with times that agree with each other (a wheel is done only if it started; a bay works one
// wheel at a time; a job is collected only after its last wheel). Everything is planned in minutes relative to now.
import type { Knex } from 'knex';
import { insertRows, reserveIds } from './bulk';
import { inventDotCode } from './invented';
import type { Rng } from './prng';
import type { ServiceRow } from './reference';

export type Position = 'LF' | 'RF' | 'LR' | 'RR' | 'SP';
export type JobState = 'waiting' | 'in_progress' | 'done' | 'collected' | 'cancelled';
export type WheelState = 'queued' | 'working' | 'done';

/** A customer's vehicle the simulation may bring in, with the facts a wheel record needs. */
export interface FloorVehicle {
	customerId: number;
	customerVehicleId: number;
	vehicleId: number | null;
	torqueNm: number | null;
	placardFrontKpa: number | null;
	placardRearKpa: number | null;
	lightTruck: boolean;
}

export interface FloorBay {
	id: number;
	techId: number;
	/** Minute (relative to now) after which this bay takes no new work, e.g. its technician went on a break. */
	closesAtMin?: number;
}

export interface FloorOptions {
	rng: Rng;
	jobCount: number;
	/** Minutes since the floor opened. */
	spanMin: number;
	/** The lead puts a job in a bay only if it would start within this many minutes; later ones wait in line. */
	horizonMin: number;
	cancelledCount: number;
	bays: readonly FloorBay[];
	services: readonly ServiceRow[];
	vehicles: readonly FloorVehicle[];
	writerIds: readonly number[];
	/** Share of done wheels that carry a wheel record. */
	recordShare: number;
	forceLimitN: number;
}

export interface PlannedRecord {
	tread_depth_mm: number | null;
	dot_code: string | null;
	pressure_set_kpa: number | null;
	weights: { plane: 'inner' | 'outer'; type: 'clip' | 'adhesive'; grams: number; angleDeg: number }[];
	force_before_n: number | null;
	force_after_n: number | null;
	match_mounted: boolean;
	torque_applied_nm: number | null;
	notes: string;
}

export interface PlannedWheel {
	position: Position;
	bayIndex: number | null;
	queuePosition: number | null;
	state: WheelState;
	techId: number | null;
	startMin: number | null;
	finishMin: number | null;
	record: PlannedRecord | null;
}

export interface PlannedJob {
	vehicle: FloorVehicle;
	kind: 'waiter' | 'drop_off';
	state: JobState;
	createdMin: number;
	promisedMin: number;
	priority: number;
	notes: string;
	createdBy: number;
	startedMin: number | null;
	doneMin: number | null;
	collectedMin: number | null;
	updatedMin: number;
	serviceIds: number[];
	wheels: PlannedWheel[];
}

interface Recipe {
	key: string;
	weight: number;
	services(rng: Rng): string[];
	positions(rng: Rng, v: FloorVehicle): Position[];
	notes: readonly string[];
}

const FOUR: Position[] = ['LF', 'RF', 'LR', 'RR'];

const RECIPES: readonly Recipe[] = [
	{
		key: 'changeover',
		weight: 34,
		services: (rng) => ['changeover', ...(rng.chance(0.2) ? ['tpms'] : [])],
		positions: () => FOUR,
		notes: [
			'Other set goes in the trunk, bagged.',
			'Customer wheels: check for a locking nut before lifting.',
			'Set came from storage: rack tag on the LF.'
		]
	},
	{
		key: 'new-tires',
		weight: 26,
		services: (rng) => [
			'mount-balance',
			...(rng.chance(0.4) ? ['tpms'] : []),
			...(rng.chance(0.1) ? ['force-check'] : [])
		],
		positions: (rng, v) => (v.lightTruck && rng.chance(0.3) ? [...FOUR, 'SP'] : FOUR),
		notes: ['Old tires to scrap.', 'Customer keeps the old tires.', 'New valve stems on all four.']
	},
	{
		key: 'pair',
		weight: 8,
		services: () => ['mount-balance'],
		positions: (rng) => (rng.chance(0.5) ? ['LF', 'RF'] : ['LR', 'RR']),
		notes: ['New pair goes on the rear axle.', 'Match tread pattern to the other axle.']
	},
	{
		key: 'flat',
		weight: 12,
		services: () => ['flat-repair'],
		positions: (rng) => [rng.pick(FOUR)],
		notes: [
			'Screw in the tread; driven on for about 2 km.',
			'Nail near the shoulder: check it is inside the repair area before plugging.'
		]
	},
	{
		key: 'rotation',
		weight: 8,
		services: () => ['rotation'],
		positions: () => FOUR,
		notes: ['Front to rear, same side.']
	},
	{
		key: 'retorque',
		weight: 7,
		services: () => ['retorque'],
		positions: () => FOUR,
		notes: ['Re-check after last week\u2019s changeover.', 'Customer heard a click from the RF.']
	},
	{
		key: 'vibration',
		weight: 5,
		services: () => ['force-check', 'mount-balance'],
		positions: () => FOUR,
		notes: [
			'Steering shake at 100 km/h since last week\u2019s new tires.',
			'Shake comes and goes; road test before and after.'
		]
	}
];

const RIM_NOTES = [
	'',
	'',
	'',
	'',
	'',
	'',
	'Curb rash on the outer lip before work; shown to the customer.',
	'Stud thread damaged: stud replaced.',
	'Valve stem cracked: replaced.',
	'Bead seat corroded: cleaned and sealed.'
];

function ceilTo(value: number, step: number): number {
	return Math.ceil(value / step) * step;
}

function round1(value: number): number {
	return Math.round(value * 10) / 10;
}

function inventRecord(
	rng: Rng,
	recipe: Recipe,
	codes: readonly string[],
	v: FloorVehicle,
	position: Position,
	finishedMin: number,
	forceLimitN: number,
	today: Date
): PlannedRecord {
	const front = position === 'LF' || position === 'RF';
	const placard = (front ? v.placardFrontKpa : v.placardRearKpa) ?? 240;
	const newTire = codes.includes('mount-balance');
	const balanced = newTire || codes.includes('flat-repair');
	const weights: PlannedRecord['weights'] = [];
	if (balanced) {
		const type = rng.chance(0.75) ? 'adhesive' : 'clip';
		weights.push({ plane: 'inner', type, grams: 5 * rng.int(1, 12), angleDeg: rng.int(0, 359) });
		if (rng.chance(0.7)) weights.push({ plane: 'outer', type, grams: 5 * rng.int(1, 8), angleDeg: rng.int(0, 359) });
	}
	let forceBefore: number | null = null;
	let forceAfter: number | null = null;
	let matchMounted = false;
	if (codes.includes('force-check')) {
		forceBefore = round1(rng.between(50, 180));
		if (forceBefore > forceLimitN) {
			// Over the store's limit: the tire is turned on the rim to meet the rim's low point, and read again.
			matchMounted = true;
			forceAfter = round1(forceBefore * rng.between(0.35, 0.65));
		}
	}
	// A tire cannot be made after the day it is mounted: this year's date codes stop two weeks before today.
	const thisYear = today.getUTCFullYear();
	const weekNow = Math.floor((today.getTime() - Date.UTC(thisYear, 0, 1)) / (7 * 86_400_000)) + 1;
	const year = thisYear - (newTire && weekNow > 3 ? rng.int(0, 1) : rng.int(1, 5));
	const week = rng.int(1, year === thisYear ? weekNow - 2 : 52);
	const dot = newTire || rng.chance(0.3) ? inventDotCode(rng, year, week) : null;
	const treadNew = v.lightTruck ? rng.between(11, 13.5) : rng.between(8, 9.5);
	return {
		tread_depth_mm: recipe.key === 'retorque' ? null : Math.round((newTire ? treadNew : rng.between(3.5, 8)) * 2) / 2,
		dot_code: dot,
		pressure_set_kpa: recipe.key === 'retorque' ? null : round1(placard + rng.int(0, 2) * 7),
		weights,
		force_before_n: forceBefore,
		force_after_n: forceAfter,
		match_mounted: matchMounted,
		torque_applied_nm: v.torqueNm,
		notes:
			rng.pick(RIM_NOTES) ||
			(finishedMin > -30 && rng.chance(0.3) ? 'Re-torque advised after the first 50\u2013100 km.' : '')
	};
}

export function planFloor(o: FloorOptions, today: Date): PlannedJob[] {
	const { rng } = o;
	if (o.vehicles.length < o.jobCount)
		throw new RangeError(`the floor needs ${o.jobCount} customer vehicles, only ${o.vehicles.length} exist`);
	const serviceByCode = new Map(o.services.map((s) => [s.code, s]));
	const vehicles = rng.shuffle([...o.vehicles]).slice(0, o.jobCount);
	const openMin = -o.spanMin;
	const created = Array.from({ length: o.jobCount }, () =>
		Math.round(openMin - 15 + (o.spanMin + 13) * rng.next() ** 1.2)
	).sort((a, b) => a - b);
	const cancelled = new Set<number>();
	while (cancelled.size < Math.min(o.cancelledCount, o.jobCount))
		cancelled.add(rng.int(3, Math.floor(o.jobCount * 0.7)));

	const bayFree = o.bays.map(() => openMin);
	const bayWheels: PlannedWheel[][] = o.bays.map(() => []);
	const createdOf = new Map<PlannedWheel, number>();
	let lineStarted = false;
	const jobs: PlannedJob[] = [];
	const recipes: Recipe[] = [];
	const codes: string[][] = [];

	for (let i = 0; i < o.jobCount; i++) {
		const v = vehicles[i];
		const recipe = rng.weighted(RECIPES.map((r) => [r, r.weight] as const));
		const jobCodes = recipe.services(rng);
		recipes.push(recipe);
		codes.push(jobCodes);
		const positions = recipe.positions(rng, v);
		const minutes = (per: 'wheel' | 'job') =>
			jobCodes.reduce((m, c) => {
				const s = serviceByCode.get(c);
				return m + (s && s.per === per ? Number(s.standard_minutes) : 0);
			}, 0);
		// Per-job minutes are shared out over the wheels, as the queue forecast does.
		const perWheel = minutes('wheel') + minutes('job') / positions.length;
		const createdMin = created[i];
		const kind =
			createdMin < openMin ? (rng.chance(0.85) ? 'drop_off' : 'waiter') : rng.chance(0.6) ? 'waiter' : 'drop_off';
		const comeback = recipe.key === 'vibration' || recipe.key === 'retorque';
		const promisedMin =
			kind === 'waiter'
				? createdMin + ceilTo(perWheel * positions.length + rng.int(15, 50), 5)
				: ceilTo(createdMin + rng.int(90, 240), 15);
		const wheels: PlannedWheel[] = positions.map((position) => ({
			position,
			bayIndex: null,
			queuePosition: null,
			state: 'queued',
			techId: null,
			startMin: null,
			finishMin: null,
			record: null
		}));
		const job: PlannedJob = {
			vehicle: v,
			kind,
			state: 'waiting',
			createdMin,
			promisedMin,
			priority: comeback && rng.chance(0.5) ? 1 : 0,
			notes: rng.chance(0.35)
				? rng.pick(recipe.notes)
				: kind === 'waiter' && rng.chance(0.2)
					? 'Waiting in the lounge.'
					: '',
			createdBy: rng.pick(o.writerIds),
			startedMin: null,
			doneMin: null,
			collectedMin: null,
			updatedMin: createdMin,
			serviceIds: jobCodes.map((c) => serviceByCode.get(c)?.id).filter((id): id is number => id !== undefined),
			wheels
		};
		jobs.push(job);

		if (cancelled.has(i)) {
			job.state = 'cancelled';
			job.notes = rng.pick([
				'Customer left before the work started.',
				'Booked twice by phone; duplicate.',
				'Wrong size on order; customer will come back.'
			]);
			job.updatedMin = Math.min(createdMin + rng.int(5, 25), -1);
			continue;
		}
		if (lineStarted) continue;

		const checkIn = createdMin + rng.int(3, 8);
		const durations = positions.map(() => perWheel * rng.between(0.8, 1.3) + 0.5);
		const total = durations.reduce((a, b) => a + b, 0);
		const gaps = o.bays.map(() => rng.int(1, 4));
		const split = positions.length >= 4 && rng.chance(0.4);
		// Candidate bays by when they could start, leaving out a bay that would run past its closing.
		const candidates = o.bays
			.map((bay, b) => ({ b, start: Math.max(bayFree[b] + gaps[b], checkIn), closes: bay.closesAtMin }))
			.filter((c) => c.closes === undefined || c.start + total <= c.closes)
			.sort((x, y) => x.start - y.start || x.b - y.b);
		if (!candidates.length || candidates[0].start > o.horizonMin) {
			// From here on the lead has not placed anyone: the rest of the line waits without a bay.
			lineStarted = true;
			continue;
		}
		// The lead spreads a four-wheel job over two bays when a second one is free about as soon.
		const lanes =
			split && candidates.length > 1 && candidates[1].start <= candidates[0].start + 10
				? candidates.slice(0, 2)
				: candidates.slice(0, 1);
		const perLane = Math.ceil(wheels.length / lanes.length);
		lanes.forEach((lane, l) => {
			let t = lane.start;
			wheels.slice(l * perLane, (l + 1) * perLane).forEach((w, k) => {
				w.bayIndex = lane.b;
				w.startMin = t;
				w.finishMin = t + durations[l * perLane + k];
				t = w.finishMin;
				bayWheels[lane.b].push(w);
				createdOf.set(w, createdMin);
			});
			bayFree[lane.b] = t;
		});
	}

	// A bay caught between two jobs at the cut would look idle on a rush morning; its technician has already
	// pulled the next wheel, provided that wheel's car had arrived.
	bayWheels.forEach((list) => {
		const next = list.findIndex((w) => (w.finishMin as number) > 0);
		if (next < 0 || (list[next].startMin as number) <= 0 || (list[next].startMin as number) > 15) return;
		const earliest = Math.max(
			next > 0 ? (list[next - 1].finishMin as number) : -Infinity,
			createdOf.get(list[next]) as number
		);
		if (earliest >= 0) return;
		list[next].startMin = Math.max(earliest + 0.5, -2);
	});

	// Cut at now.
	bayWheels.forEach((list, b) => {
		let queue = 0;
		for (const w of list) {
			const start = w.startMin as number;
			const finish = w.finishMin as number;
			if (finish <= 0) {
				w.state = 'done';
				w.techId = o.bays[b].techId;
			} else if (start <= 0) {
				w.state = 'working';
				w.techId = o.bays[b].techId;
				w.finishMin = null;
				w.queuePosition = ++queue;
			} else {
				w.startMin = null;
				w.finishMin = null;
				w.queuePosition = ++queue;
			}
		}
	});

	for (const job of jobs) {
		if (job.state === 'cancelled') continue;
		const started = job.wheels.filter((w) => w.startMin !== null).map((w) => w.startMin as number);
		const allDone = job.wheels.every((w) => w.state === 'done');
		job.startedMin = started.length ? Math.min(...started) : null;
		if (allDone) {
			job.doneMin = Math.max(...job.wheels.map((w) => w.finishMin as number));
			const pickup = job.doneMin + (job.kind === 'waiter' ? rng.int(2, 12) : rng.int(45, 240));
			job.state = pickup <= -1 ? 'collected' : 'done';
			if (job.state === 'collected') job.collectedMin = pickup;
		} else {
			job.state = started.length ? 'in_progress' : 'waiting';
		}
		const times = job.wheels.flatMap((w) => [w.startMin, w.finishMin]).filter((m): m is number => m !== null);
		job.updatedMin = Math.max(job.createdMin, ...times, job.collectedMin ?? -Infinity);
	}

	// Wheel records for a share of the finished wheels, drawn in a second pass so the plan above stays stable.
	jobs.forEach((job, i) => {
		for (const w of job.wheels) {
			if (w.state === 'done' && rng.chance(o.recordShare)) {
				w.record = inventRecord(
					rng,
					recipes[i],
					codes[i],
					job.vehicle,
					w.position,
					w.finishMin as number,
					o.forceLimitN,
					today
				);
			}
		}
	});
	return jobs;
}

/** Counts per job state and wheel state, for the seed's own check and its log line. */
export function tally(jobs: readonly PlannedJob[]): {
	jobs: Record<JobState, number>;
	wheels: Record<WheelState | 'unplaced', number>;
} {
	const j: Record<JobState, number> = { waiting: 0, in_progress: 0, done: 0, collected: 0, cancelled: 0 };
	const w: Record<WheelState | 'unplaced', number> = { queued: 0, working: 0, done: 0, unplaced: 0 };
	for (const job of jobs) {
		j[job.state]++;
		for (const wheel of job.wheels) {
			w[wheel.state]++;
			if (wheel.bayIndex === null) w.unplaced++;
		}
	}
	return { jobs: j, wheels: w };
}

/**
 * Writes the plan. `scale` shrinks every offset when the store's day is younger than the morning (a seed run just
 * after midnight), so the jobs still count as created today.
 */
export async function writeFloor(
	db: Knex,
	storeId: number,
	firstNumber: number,
	now: Date,
	scale: number,
	bays: readonly FloorBay[],
	jobs: readonly PlannedJob[]
): Promise<void> {
	const at = (min: number | null) => (min === null ? null : new Date(now.getTime() + Math.round(min * scale * 60_000)));
	// Who is on each bay now: its technician, unless the bay has closed for a break.
	await db('bays').whereIn('id', bays.map((b) => b.id)).update({ tech_id: null });
	for (const bay of bays) {
		if (bay.closesAtMin === undefined || bay.closesAtMin > 0) await db('bays').where({ id: bay.id }).update({ tech_id: bay.techId });
	}
	const ordered = [...jobs].sort((a, b) => a.createdMin - b.createdMin);
	const jobIds = await reserveIds(db, 'jobs', ordered.length);
	const wheelCount = ordered.reduce((n, j) => n + j.wheels.length, 0);
	const wheelIds = await reserveIds(db, 'wheels', wheelCount);
	const jobRows: Record<string, unknown>[] = [];
	const serviceRows: Record<string, unknown>[] = [];
	const wheelRows: Record<string, unknown>[] = [];
	const recordRows: Record<string, unknown>[] = [];
	ordered.forEach((job, i) => {
		const id = jobIds[i];
		jobRows.push({
			id,
			store_id: storeId,
			number: firstNumber + i,
			customer_id: job.vehicle.customerId,
			customer_vehicle_id: job.vehicle.customerVehicleId,
			vehicle_id: job.vehicle.vehicleId,
			kind: job.kind,
			state: job.state,
			promised_at: at(job.promisedMin),
			priority: job.priority,
			notes: job.notes,
			created_by: job.createdBy,
			started_at: at(job.startedMin),
			done_at: at(job.doneMin),
			collected_at: at(job.collectedMin),
			created_at: at(job.createdMin),
			updated_at: at(job.updatedMin)
		});
		for (const serviceId of job.serviceIds) serviceRows.push({ job_id: id, service_id: serviceId });
		for (const w of job.wheels) {
			const wheelId = wheelIds[wheelRows.length];
			wheelRows.push({
				id: wheelId,
				job_id: id,
				position: w.position,
				bay_id: w.bayIndex === null ? null : bays[w.bayIndex].id,
				queue_position: w.queuePosition,
				state: w.state,
				tech_id: w.techId,
				started_at: at(w.startMin),
				finished_at: at(w.finishMin),
				created_at: at(job.createdMin),
				updated_at: at(w.finishMin ?? w.startMin ?? job.createdMin)
			});
			if (w.record) {
				recordRows.push({
					wheel_id: wheelId,
					...w.record,
					recorded_by: w.techId,
					created_at: at(w.finishMin),
					updated_at: at(w.finishMin)
				});
			}
		}
	});
	await insertRows(
		db,
		'jobs',
		{
			id: 'int',
			store_id: 'int',
			number: 'int',
			customer_id: 'int',
			customer_vehicle_id: 'int',
			vehicle_id: 'int',
			kind: 'text',
			state: 'text',
			promised_at: 'timestamptz',
			priority: 'int',
			notes: 'text',
			created_by: 'int',
			started_at: 'timestamptz',
			done_at: 'timestamptz',
			collected_at: 'timestamptz',
			created_at: 'timestamptz',
			updated_at: 'timestamptz'
		},
		jobRows
	);
	await insertRows(db, 'job_services', { job_id: 'int', service_id: 'int' }, serviceRows);
	await insertRows(
		db,
		'wheels',
		{
			id: 'int',
			job_id: 'int',
			position: 'text',
			bay_id: 'int',
			queue_position: 'int',
			state: 'text',
			tech_id: 'int',
			started_at: 'timestamptz',
			finished_at: 'timestamptz',
			created_at: 'timestamptz',
			updated_at: 'timestamptz'
		},
		wheelRows
	);
	await insertRows(
		db,
		'wheel_records',
		{
			wheel_id: 'int',
			tread_depth_mm: 'numeric',
			dot_code: 'text',
			pressure_set_kpa: 'numeric',
			weights: 'jsonb',
			force_before_n: 'numeric',
			force_after_n: 'numeric',
			match_mounted: 'bool',
			torque_applied_nm: 'numeric',
			notes: 'text',
			recorded_by: 'int',
			created_at: 'timestamptz',
			updated_at: 'timestamptz'
		},
		recordRows
	);
}

// The manager's reports against a hand-built fixture day in a store of its own (America/Chicago, UTC−6 in November,
// target 15 min per wheel, 2 active bays and one out of service). On 2026-11-10, local time:
//   bay T1 (tech):  6 wheels of 15 min back to back, 09:00–10:30 (finishing 09:15, 09:30, … 10:30);
//   bay T2 (tech2): 6 wheels of 10 min, starting 09:00, 09:15, … 10:15 (finishing 09:10, 09:25, … 10:25).
// Jobs: J1 taken 08:40, first wheel 09:00, done 09:30, promised 09:45 (kept); J2 taken 08:50, first wheel 09:30,
// done 10:00, promised 10:00 (kept: on the minute); J3 taken 09:00, first wheel 10:00, done 10:30, promised 10:15
// (15 min late); J4 taken 09:30, nothing started, promised 11:00 (late and still open at 12:00: 60 min); J5 cancelled;
// J6 promised 13:00 (not yet due at 12:00). J0 was done at 23:30 the evening before: 05:30 UTC on the 10th, inside the
// day in UTC but not where the store is, so every report leaves it out.
// Each figure is worked out by hand below, and the per-hour and per-technician figures are also computed in
// JavaScript from the fixture's raw rows read back from the database.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { floorCapacity } from '$lib/calc/pacing';
import { toCsv } from '$lib/server/csv';
import { close } from '$lib/server/db';
import * as reports from '$lib/server/db/reports';
import { reportRangeSchema } from '$lib/schemas/reports';
import { withClient } from '../support/database';
import { createTestStore, type TestStore } from '../support/store';

const TZ = 'America/Chicago';
/** Local time on the fixture day (UTC−6) as an instant. */
const at = (hhmm: string, day = '2026-11-10') => new Date(`${day}T${hhmm}:00-06:00`);
const day = reportRangeSchema.parse({ from: '2026-11-10', to: '2026-11-11' });
const NOW = at('12:00');

let store: TestStore;

beforeAll(async () => {
	store = await createTestStore(`reports-${process.pid}`, 3);
	const [t1, t2, t3] = store.bays;
	const { tech, tech2 } = store.people;
	await withClient(async (c) => {
		await c.query('BEGIN');
		await c.query('UPDATE stores SET timezone = $2, target_min_per_wheel = 15 WHERE id = $1', [store.id, TZ]);
		await c.query('UPDATE bays SET active = false WHERE id = $1', [t3.id]);
		const customer = await c.query(
			`INSERT INTO customers (store_id, name) VALUES ($1, 'Invented Reports') RETURNING id`,
			[store.id]
		);
		const service = await c.query(`SELECT id FROM services WHERE store_id = $1 AND code = 'mount-balance'`, [store.id]);
		const job = async (
			number: number,
			state: string,
			created: Date,
			promised: Date,
			done: Date | null,
			withService = true
		) => {
			const { rows } = await c.query(
				`INSERT INTO jobs (store_id, number, customer_id, kind, state, created_at, promised_at, started_at, done_at)
				 VALUES ($1, $2, $3, 'waiter', $4, $5, $6, $7, $8) RETURNING id`,
				[store.id, number, customer.rows[0].id, state, created, promised, done ? created : null, done]
			);
			if (withService) {
				await c.query('INSERT INTO job_services (job_id, service_id) VALUES ($1, $2)', [
					rows[0].id,
					service.rows[0].id
				]);
			}
			return rows[0].id as number;
		};
		const wheel = (jobId: number, position: string, bay: number, techId: number, start: Date, minutes: number) =>
			c.query(
				`INSERT INTO wheels (job_id, position, bay_id, state, tech_id, started_at, finished_at)
				 VALUES ($1, $2, $3, 'done', $4, $5, $6)`,
				[jobId, position, bay, techId, start, new Date(start.getTime() + minutes * 60_000)]
			);
		const j1 = await job(1, 'done', at('08:40'), at('09:45'), at('09:30'));
		const j2 = await job(2, 'done', at('08:50'), at('10:00'), at('10:00'));
		const j3 = await job(3, 'done', at('09:00'), at('10:15'), at('10:30'));
		await job(4, 'waiting', at('09:30'), at('11:00'), null);
		await job(5, 'cancelled', at('09:40'), at('10:00'), null);
		await job(6, 'waiting', at('11:30'), at('13:00'), null);
		const j0 = await job(7, 'done', at('22:30', '2026-11-09'), at('23:45', '2026-11-09'), at('23:30', '2026-11-09'));
		await wheel(j0, 'LF', t1.id, tech.id, at('23:00', '2026-11-09'), 30);
		const positions = ['LF', 'RF', 'LR', 'RR'];
		const jobsInOrder = [j1, j1, j2, j2, j3, j3];
		for (let i = 0; i < 6; i++) {
			const start = new Date(at('09:00').getTime() + i * 15 * 60_000);
			await wheel(jobsInOrder[i], positions[i % 2], t1.id, tech.id, start, 15);
			await wheel(jobsInOrder[i], positions[2 + (i % 2)], t2.id, tech2.id, start, 10);
		}
		// Force readings (N) on T1's first three wheels, a record without readings on the fourth, and one on the evening
		// before (outside the day). The store's limit is the default 111.2 N.
		const t1Wheels = await c.query(
			`SELECT w.id FROM wheels w JOIN jobs j ON j.id = w.job_id
			  WHERE j.store_id = $1 AND w.bay_id = $2 ORDER BY w.started_at`,
			[store.id, t1.id]
		);
		const [evening, w1, w2, w3, w4] = t1Wheels.rows.map((r) => r.id as number);
		const record = (
			wheelId: number,
			before: number | null,
			after: number | null,
			match: boolean,
			weights: [string, number][],
			dot: string
		) =>
			c.query(
				`INSERT INTO wheel_records (wheel_id, force_before_n, force_after_n, match_mounted, weights, dot_code)
				 VALUES ($1, $2, $3, $4, $5, $6)`,
				[
					wheelId,
					before,
					after,
					match,
					JSON.stringify(
						weights.map(([type, grams], i) => ({ plane: i ? 'outer' : 'inner', type, grams, angleDeg: 0 }))
					),
					dot
				]
			);
		// Weights and DOT codes: w1 clip 20 g + adhesive 15 g, made week 45 of 2023 (3 years before the work); w2
		// adhesive 30 g, week 01 of 2020 (6 years); w3 none, week 52 of 2030 (after the work: unreadable); w4 clip 10 g +
		// clip 5 g, week 10 of 2016 (10+ years).
		await record(evening, 400, 300, false, [['clip', 100]], 'DOT 0101');
		await record(
			w1,
			150,
			90,
			false,
			[
				['clip', 20],
				['adhesive', 15]
			],
			'DOT XJ 4K 3A 4523'
		);
		await record(w2, 130, 120, true, [['adhesive', 30]], '0120');
		await record(w3, 100, 60, true, [], '5230');
		await record(
			w4,
			null,
			null,
			true,
			[
				['clip', 10],
				['clip', 5]
			],
			'DOT 1016'
		);
		await c.query('COMMIT');
	});
});

afterAll(async () => {
	await close();
});

/** The fixture's done wheels as stored, with the local hour each finished in, computed here without SQL. */
async function rawWheels() {
	const hourOf = new Intl.DateTimeFormat('en-GB', { timeZone: TZ, hour: '2-digit', hourCycle: 'h23' });
	const dayOf = new Intl.DateTimeFormat('en-CA', { timeZone: TZ, year: 'numeric', month: '2-digit', day: '2-digit' });
	const { rows } = await withClient((c) =>
		c.query(
			`SELECT w.started_at, w.finished_at, u.name AS tech FROM wheels w JOIN jobs j ON j.id = w.job_id
			 JOIN users u ON u.id = w.tech_id WHERE j.store_id = $1 AND w.state = 'done'`,
			[store.id]
		)
	);
	return rows
		.filter((r) => dayOf.format(r.finished_at) === '2026-11-10')
		.map((r) => ({
			hour: Number(hourOf.format(r.finished_at)),
			minutes: (r.finished_at.getTime() - r.started_at.getTime()) / 60_000,
			tech: r.tech as string
		}));
}

describe('wheels per hour against capacity', () => {
	it('counts the wheels finished in each local hour and compares with floorCapacity(2 bays, 15 min)', async () => {
		const t = await reports.throughput(store.id, day);
		// By hand: hour 09 has T1's 09:15, 09:30, 09:45 and T2's 09:10, 09:25, 09:40, 09:55 → 7; hour 10 the other 5.
		expect(t.hours.map((h) => [h.hour, h.wheels])).toEqual([
			[9, 7],
			[10, 5]
		]);
		expect(t.totalWheels).toBe(12);
		expect(t.activeBays).toBe(2);
		// 2 bays × 60 min ÷ 15 min per wheel = 8 wheels an hour.
		expect(t.capacityPerHour).toBe(8);
		expect(floorCapacity(2, 15)).toBe(8);
		expect(t.hours[0]).toMatchObject({ perDay: 7, capacity: 8, percentOfCapacity: 88 });
		expect(t.hours[1]).toMatchObject({ perDay: 5, percentOfCapacity: 63 });

		const raw = await rawWheels();
		const byHour = new Map<number, number>();
		for (const w of raw) byHour.set(w.hour, (byHour.get(w.hour) ?? 0) + 1);
		expect(t.hours.map((h) => [h.hour, h.wheels])).toEqual([...byHour].sort((a, b) => a[0] - b[0]));
	});

	it('divides by the days of the range: a week with one working day', async () => {
		const t = await reports.throughput(store.id, { from: '2026-11-09', to: '2026-11-16' });
		// The evening before (23:30 on the 9th) is in this range: hour 23 has 1 wheel.
		expect(t.days).toBe(7);
		expect(t.hours.map((h) => [h.hour, h.wheels, h.perDay])).toEqual([
			[9, 7, 1],
			[10, 5, 0.7],
			[23, 1, 0.1]
		]);
	});
});

describe('minutes per wheel', () => {
	it('averages finish − start by technician, bay, service and hour, against the target', async () => {
		const p = await reports.pace(store.id, day);
		// (6 × 15 + 6 × 10) ÷ 12 = 12.5 min; hour 09: (3 × 15 + 4 × 10) ÷ 7 = 12.14…; hour 10: (3 × 15 + 2 × 10) ÷ 5 = 13.
		expect(p.targetMinPerWheel).toBe(15);
		expect(p.overall).toEqual({ wheels: 12, avgMinutes: 12.5 });
		const of = (by: string) =>
			p.rows.filter((r) => r.by === by).map((r) => [r.key, r.wheels, r.avgMinutes, r.vsTarget]);
		expect(of('technician')).toEqual([
			[`tech of ${store.slug}`, 6, 15, 0],
			[`tech2 of ${store.slug}`, 6, 10, -5]
		]);
		expect(of('bay')).toEqual([
			['T1', 6, 15, 0],
			['T2', 6, 10, -5]
		]);
		expect(of('service')).toEqual([['mount-balance', 12, 12.5, -2.5]]);
		expect(of('hour')).toEqual([
			['09', 7, 12.1, -2.9],
			['10', 5, 13, -2]
		]);

		const raw = await rawWheels();
		const avg = (xs: number[]) => Math.round((xs.reduce((a, b) => a + b, 0) / xs.length) * 10) / 10;
		expect(p.overall.avgMinutes).toBe(avg(raw.map((w) => w.minutes)));
		for (const [key, , minutes] of of('technician')) {
			expect(minutes).toBe(avg(raw.filter((w) => w.tech === key).map((w) => w.minutes)));
		}
		for (const [key, , minutes] of of('hour')) {
			expect(minutes).toBe(avg(raw.filter((w) => w.hour === Number(key)).map((w) => w.minutes)));
		}
	});
});

describe('promises kept', () => {
	it('counts jobs done by their promise, and how late the others are', async () => {
		const p = await reports.promises(store.id, day, NOW);
		// Due by 12:00: J1, J2 (kept), J3 (15 min late), J4 (open, 60 min late at 12:00). J5 cancelled, J6 not yet due.
		expect(p).toEqual({
			jobs: 4,
			kept: 2,
			late: 2,
			stillOpen: 1,
			keptPercent: 50,
			avgLateMinutes: 37.5,
			maxLateMinutes: 60
		});
	});
});

describe('waiting for the first wheel', () => {
	it('takes average, median and 90th percentile of taken-in → first wheel started', async () => {
		const w = await reports.waiting(store.id, day);
		// J1 20 min, J2 40, J3 60; J4 and J6 not started (J5 cancelled). p90 by linear interpolation over 3 values:
		// position 0.9 × 2 = 1.8 → 40 + 0.8 × (60 − 40) = 56.
		expect(w).toEqual({ jobs: 3, notStarted: 2, avgMinutes: 40, p50Minutes: 40, p90Minutes: 56, maxMinutes: 60 });
	});
});

describe('force variation and match mounting', () => {
	it('averages the readings before and after and counts the share within the limit', async () => {
		const f = await reports.force(store.id, day);
		// All: (150 + 130 + 100) ÷ 3 = 126.7 before, (90 + 120 + 60) ÷ 3 = 90 after, 2 of 3 at or under 111.2 N.
		// Match mounted: 115 before, 90 after, 1 of 2 within; not match mounted: 150, 90, 1 of 1.
		expect(f.limitN).toBe(111.2);
		expect(f.rows).toEqual([
			{ group: 'all', wheels: 3, avgBeforeN: 126.7, avgAfterN: 90, withinLimitPercent: 66.7 },
			{ group: 'match mounted', wheels: 2, avgBeforeN: 115, avgAfterN: 90, withinLimitPercent: 50 },
			{ group: 'not match mounted', wheels: 1, avgBeforeN: 150, avgAfterN: 90, withinLimitPercent: 100 }
		]);
	});
});

describe('balance weights and tire ages', () => {
	it('sums the weights by type from the records', async () => {
		const w = await reports.weights(store.id, day);
		// 4 recorded wheels on the day. Clip: w1 20 + w4 10 + 5 = 35 g on 2 wheels (17.5 each; 35 ÷ 4 = 8.75 → 8.8 per
		// recorded wheel); adhesive: w1 15 + w2 30 = 45 g on 2 wheels (22.5; 45 ÷ 4 = 11.25 → 11.3).
		expect(w.recordedWheels).toBe(4);
		expect(w.rows).toEqual([
			{
				type: 'adhesive',
				wheels: 2,
				weights: 2,
				totalGrams: 45,
				gramsPerWheelUsing: 22.5,
				gramsPerRecordedWheel: 11.3
			},
			{ type: 'clip', wheels: 2, weights: 3, totalGrams: 35, gramsPerWheelUsing: 17.5, gramsPerRecordedWheel: 8.8 }
		]);
	});

	it('buckets tire ages in whole years from the DOT week and year', async () => {
		// Week 45 of 2023 starts about 2023-11-08: 3.0 years to 2026-11-10; week 01 of 2020: 6.9 years; week 10 of
		// 2016: 10.7 years; week 52 of 2030 is after the work.
		expect(await reports.tireAges(store.id, day)).toEqual([
			{ years: '3', wheels: 1 },
			{ years: '6', wheels: 1 },
			{ years: '10+', wheels: 1 },
			{ years: 'unreadable', wheels: 1 }
		]);
	});
});

describe('CSV tables', () => {
	it('gives each report as a header and rows of numbers', async () => {
		const t = await reports.table('throughput', store.id, day);
		expect(t.header[0]).toBe('hour');
		expect(t.rows).toEqual([
			[9, 7, 7, 8, 88],
			[10, 5, 5, 8, 63]
		]);
		const w = await reports.table('waiting', store.id, day);
		expect(w.rows).toEqual([[3, 2, 40, 40, 56, 60]]);
	});

	it('writes a name that looks like a formula as text in the CSV', async () => {
		await withClient((c) =>
			c.query(`UPDATE users SET name = '=HYPERLINK("http://example.test")' WHERE id = $1`, [store.people.tech2.id])
		);
		const t = await reports.table('pace', store.id, day);
		const csv = toCsv(t.header, t.rows);
		expect(csv).toContain(`technician,"'=HYPERLINK(""http://example.test"")",6,10,15,-5\r\n`);
		expect(csv).toContain('service,mount-balance,12,12.5,15,-2.5\r\n');
	});

	it('refuses an empty or reversed range', () => {
		expect(reportRangeSchema.safeParse({ from: '2026-11-10', to: '2026-11-10' }).success).toBe(false);
		expect(reportRangeSchema.safeParse({ from: '2026-11-11', to: '2026-11-10' }).success).toBe(false);
	});
});

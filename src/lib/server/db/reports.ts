// The manager's reports for one store over a range of days in the store's time zone ([from, to): the first day's
// midnight to the end day's midnight, where the store is). Every figure is computed by PostgreSQL; the app receives
// one row per hour, technician, bay or service, never the wheels themselves. Durations are minutes.
import { floorCapacity } from '$lib/calc/pacing';
import { rangeDays, type ReportName, type ReportRange } from '$lib/schemas/reports';
import { db } from './index';

/** `column` falls inside the range where the store is. (CAST, not `::`: Knex reads `:name::type` as a binding.) */
const inRange = (column: string) => `${column} >= CAST(CAST(:from AS date) AS timestamp) AT TIME ZONE s.timezone
	AND ${column} < CAST(CAST(:to AS date) AS timestamp) AT TIME ZONE s.timezone`;

const minutes = (later: string, earlier: string) => `EXTRACT(EPOCH FROM (${later} - ${earlier})) / 60.0`;

/** Rounded to 0.1 in the database, so the figures, the tables and the CSV agree. */
const r1 = (expression: string) => `round(CAST(${expression} AS numeric), 1)`;

export interface StoreBasis {
	timezone: string;
	targetMinPerWheel: number;
	activeBays: number;
	forceLimitN: number;
}

export async function basis(storeId: number): Promise<StoreBasis> {
	const { rows } = await db().raw(
		`SELECT s.timezone, s.target_min_per_wheel, s.force_variation_limit_n,
		        (SELECT count(*) FROM bays b WHERE b.store_id = s.id AND b.active) AS active_bays
		   FROM stores s WHERE s.id = ?`,
		[storeId]
	);
	const row = rows[0];
	return {
		timezone: row.timezone,
		targetMinPerWheel: Number(row.target_min_per_wheel),
		activeBays: Number(row.active_bays),
		forceLimitN: Number(row.force_variation_limit_n)
	};
}

// (a) Throughput ---------------------------------------------------------------------------------------------------

export interface HourRow {
	hour: number;
	/** Wheels finished in this hour of the day, over all days of the range. */
	wheels: number;
	/** Wheels per day in this hour (wheels ÷ days in the range). */
	perDay: number;
	/** What the floor can do in an hour at the target: floorCapacity(active bays, target). */
	capacity: number;
	/** perDay as a share of capacity, in percent (null when the floor has no capacity). */
	percentOfCapacity: number | null;
}

export interface Throughput {
	days: number;
	activeBays: number;
	targetMinPerWheel: number;
	capacityPerHour: number;
	totalWheels: number;
	hours: HourRow[];
}

export async function throughput(storeId: number, range: ReportRange): Promise<Throughput> {
	const b = await basis(storeId);
	const { rows } = await db().raw(
		`SELECT CAST(EXTRACT(HOUR FROM w.finished_at AT TIME ZONE s.timezone) AS int) AS hour, count(*) AS wheels
		   FROM wheels w
		   JOIN jobs j ON j.id = w.job_id
		   JOIN stores s ON s.id = j.store_id
		  WHERE j.store_id = :store AND w.state = 'done' AND ${inRange('w.finished_at')}
		  GROUP BY 1 ORDER BY 1`,
		{ store: storeId, from: range.from, to: range.to }
	);
	const days = rangeDays(range);
	const capacity = floorCapacity(b.activeBays, b.targetMinPerWheel);
	const hours = rows.map((r: { hour: number; wheels: number }) => {
		const perDay = Math.round((Number(r.wheels) / days) * 10) / 10;
		return {
			hour: Number(r.hour),
			wheels: Number(r.wheels),
			perDay,
			capacity: Math.round(capacity * 10) / 10,
			percentOfCapacity: capacity > 0 ? Math.round((Number(r.wheels) / days / capacity) * 100) : null
		};
	});
	return {
		days,
		activeBays: b.activeBays,
		targetMinPerWheel: b.targetMinPerWheel,
		capacityPerHour: Math.round(capacity * 10) / 10,
		totalWheels: hours.reduce((sum: number, h: HourRow) => sum + h.wheels, 0),
		hours
	};
}

// (b) Minutes per wheel ----------------------------------------------------------------------------------------------

export interface PaceRow {
	by: 'technician' | 'bay' | 'service' | 'hour';
	key: string;
	wheels: number;
	avgMinutes: number;
	/** Average minus the store's target: negative is faster than target. */
	vsTarget: number;
}

export interface PaceReport {
	targetMinPerWheel: number;
	overall: { wheels: number; avgMinutes: number | null };
	rows: PaceRow[];
}

export async function pace(storeId: number, range: ReportRange): Promise<PaceReport> {
	const b = await basis(storeId);
	const { rows } = await db().raw(
		`WITH done AS (
		   SELECT w.id, w.job_id, w.finished_at, s.timezone,
		          coalesce(u.name, 'nobody recorded') AS tech, coalesce(ba.code, 'no bay') AS bay,
		          ${minutes('w.finished_at', 'w.started_at')} AS m
		     FROM wheels w
		     JOIN jobs j ON j.id = w.job_id
		     JOIN stores s ON s.id = j.store_id
		     LEFT JOIN users u ON u.id = w.tech_id
		     LEFT JOIN bays ba ON ba.id = w.bay_id
		    WHERE j.store_id = :store AND w.state = 'done' AND ${inRange('w.finished_at')}
		 )
		 SELECT 'overall' AS dim, '' AS key, count(*) AS wheels, ${r1('avg(m)')} AS avg FROM done
		 UNION ALL
		 SELECT 'technician', tech, count(*), ${r1('avg(m)')} FROM done GROUP BY tech
		 UNION ALL
		 SELECT 'bay', bay, count(*), ${r1('avg(m)')} FROM done GROUP BY bay
		 UNION ALL
		 SELECT 'service', sv.code, count(*), ${r1('avg(d.m)')}
		   FROM done d JOIN job_services js ON js.job_id = d.job_id JOIN services sv ON sv.id = js.service_id
		  GROUP BY sv.code
		 UNION ALL
		 SELECT 'hour', lpad(CAST(CAST(EXTRACT(HOUR FROM finished_at AT TIME ZONE timezone) AS int) AS text), 2, '0'),
		        count(*), ${r1('avg(m)')}
		   FROM done GROUP BY 2
		 ORDER BY 1, 2`,
		{ store: storeId, from: range.from, to: range.to }
	);
	const order = ['technician', 'bay', 'service', 'hour'];
	const overall = rows.find((r: { dim: string }) => r.dim === 'overall');
	return {
		targetMinPerWheel: b.targetMinPerWheel,
		overall: {
			wheels: Number(overall?.wheels ?? 0),
			avgMinutes: overall?.avg === null || overall?.avg === undefined ? null : Number(overall.avg)
		},
		rows: rows
			.filter((r: { dim: string }) => r.dim !== 'overall')
			.map((r: { dim: PaceRow['by']; key: string; wheels: number; avg: number }) => ({
				by: r.dim,
				key: r.key,
				wheels: Number(r.wheels),
				avgMinutes: Number(r.avg),
				vsTarget: Math.round((Number(r.avg) - b.targetMinPerWheel) * 10) / 10
			}))
			.sort((x: PaceRow, y: PaceRow) => order.indexOf(x.by) - order.indexOf(y.by) || x.key.localeCompare(y.key))
	};
}

// (c) Promises kept --------------------------------------------------------------------------------------------------

export interface Promises {
	/** Jobs promised in the range whose promise has passed or that are done (cancelled jobs left out). */
	jobs: number;
	kept: number;
	late: number;
	/** Of the late, those still not done: their lateness runs to now. */
	stillOpen: number;
	keptPercent: number | null;
	avgLateMinutes: number | null;
	maxLateMinutes: number | null;
}

export async function promises(storeId: number, range: ReportRange, now = new Date()): Promise<Promises> {
	const { rows } = await db().raw(
		`WITH due AS (
		   SELECT j.done_at, j.promised_at,
		          j.done_at IS NOT NULL AND j.done_at <= j.promised_at AS kept,
		          ${minutes('coalesce(j.done_at, CAST(:now AS timestamptz))', 'j.promised_at')} AS late_m
		     FROM jobs j JOIN stores s ON s.id = j.store_id
		    WHERE j.store_id = :store AND j.state <> 'cancelled' AND ${inRange('j.promised_at')}
		      AND (j.done_at IS NOT NULL OR j.promised_at < CAST(:now AS timestamptz))
		 )
		 SELECT count(*) AS jobs,
		        count(*) FILTER (WHERE kept) AS kept,
		        count(*) FILTER (WHERE NOT kept) AS late,
		        count(*) FILTER (WHERE NOT kept AND done_at IS NULL) AS still_open,
		        ${r1('avg(late_m) FILTER (WHERE NOT kept)')} AS avg_late,
		        ${r1('max(late_m) FILTER (WHERE NOT kept)')} AS max_late
		   FROM due`,
		{ store: storeId, from: range.from, to: range.to, now: now.toISOString() }
	);
	const r = rows[0];
	const jobs = Number(r.jobs);
	const kept = Number(r.kept);
	return {
		jobs,
		kept,
		late: Number(r.late),
		stillOpen: Number(r.still_open),
		keptPercent: jobs > 0 ? Math.round((kept / jobs) * 1000) / 10 : null,
		avgLateMinutes: r.avg_late === null ? null : Number(r.avg_late),
		maxLateMinutes: r.max_late === null ? null : Number(r.max_late)
	};
}

// (d) Waiting --------------------------------------------------------------------------------------------------------

export interface Waiting {
	/** Jobs taken in during the range whose first wheel has started. */
	jobs: number;
	/** Jobs taken in during the range with no wheel started yet (left out of the figures). */
	notStarted: number;
	avgMinutes: number | null;
	p50Minutes: number | null;
	p90Minutes: number | null;
	maxMinutes: number | null;
}

export async function waiting(storeId: number, range: ReportRange): Promise<Waiting> {
	const { rows } = await db().raw(
		`WITH taken AS (
		   SELECT j.created_at, (SELECT min(w.started_at) FROM wheels w WHERE w.job_id = j.id) AS first_start
		     FROM jobs j JOIN stores s ON s.id = j.store_id
		    WHERE j.store_id = :store AND j.state <> 'cancelled' AND ${inRange('j.created_at')}
		 ), waits AS (
		   SELECT ${minutes('first_start', 'created_at')} AS m FROM taken WHERE first_start IS NOT NULL
		 )
		 SELECT (SELECT count(*) FROM waits) AS jobs,
		        (SELECT count(*) FROM taken WHERE first_start IS NULL) AS not_started,
		        ${r1('avg(m)')} AS avg,
		        ${r1('percentile_cont(0.5) WITHIN GROUP (ORDER BY m)')} AS p50,
		        ${r1('percentile_cont(0.9) WITHIN GROUP (ORDER BY m)')} AS p90,
		        ${r1('max(m)')} AS max
		   FROM waits`,
		{ store: storeId, from: range.from, to: range.to }
	);
	const r = rows[0];
	const n = (v: unknown) => (v === null || v === undefined ? null : Number(v));
	return {
		jobs: Number(r.jobs),
		notStarted: Number(r.not_started),
		avgMinutes: n(r.avg),
		p50Minutes: n(r.p50),
		p90Minutes: n(r.p90),
		maxMinutes: n(r.max)
	};
}

// (e) Force variation and match mounting ---------------------------------------------------------------------------

export interface ForceRow {
	group: 'all' | 'match mounted' | 'not match mounted';
	/** Wheels finished in the range with a force reading before or after. */
	wheels: number;
	avgBeforeN: number | null;
	avgAfterN: number | null;
	/** Of the wheels with an after reading, the share at or under the store's limit, in percent. */
	withinLimitPercent: number | null;
}

export interface ForceReport {
	limitN: number;
	rows: ForceRow[];
}

export async function force(storeId: number, range: ReportRange): Promise<ForceReport> {
	const b = await basis(storeId);
	const { rows } = await db().raw(
		`SELECT CASE WHEN GROUPING(r.match_mounted) = 1 THEN 'all'
		             WHEN r.match_mounted THEN 'match mounted' ELSE 'not match mounted' END AS grp,
		        count(*) AS wheels,
		        ${r1('avg(r.force_before_n)')} AS avg_before,
		        ${r1('avg(r.force_after_n)')} AS avg_after,
		        ${r1('100.0 * count(*) FILTER (WHERE r.force_after_n <= s.force_variation_limit_n) / nullif(count(r.force_after_n), 0)')} AS within
		   FROM wheel_records r
		   JOIN wheels w ON w.id = r.wheel_id
		   JOIN jobs j ON j.id = w.job_id
		   JOIN stores s ON s.id = j.store_id
		  WHERE j.store_id = :store AND w.state = 'done' AND ${inRange('w.finished_at')}
		    AND (r.force_before_n IS NOT NULL OR r.force_after_n IS NOT NULL)
		  GROUP BY ROLLUP (r.match_mounted)
		  ORDER BY GROUPING(r.match_mounted) DESC, r.match_mounted DESC`,
		{ store: storeId, from: range.from, to: range.to }
	);
	const n = (v: unknown) => (v === null || v === undefined ? null : Number(v));
	return {
		limitN: b.forceLimitN,
		rows: rows.map((r: Record<string, unknown>) => ({
			group: r.grp as ForceRow['group'],
			wheels: Number(r.wheels),
			avgBeforeN: n(r.avg_before),
			avgAfterN: n(r.avg_after),
			withinLimitPercent: n(r.within)
		}))
	};
}

// (f) Balance weights ----------------------------------------------------------------------------------------------

export interface WeightRow {
	type: string;
	/** Wheels (finished in the range, with a record) that took at least one weight of this type. */
	wheels: number;
	weights: number;
	totalGrams: number;
	/** Grams per wheel that took this type. */
	gramsPerWheelUsing: number;
	/** Grams per recorded wheel, whether it took this type or not. */
	gramsPerRecordedWheel: number;
}

export interface WeightReport {
	recordedWheels: number;
	rows: WeightRow[];
}

export async function weights(storeId: number, range: ReportRange): Promise<WeightReport> {
	const { rows } = await db().raw(
		`WITH rec AS (
		   SELECT r.wheel_id, r.weights
		     FROM wheel_records r
		     JOIN wheels w ON w.id = r.wheel_id
		     JOIN jobs j ON j.id = w.job_id
		     JOIN stores s ON s.id = j.store_id
		    WHERE j.store_id = :store AND w.state = 'done' AND ${inRange('w.finished_at')}
		 ), el AS (
		   SELECT rec.wheel_id, coalesce(e ->> 'type', 'unknown') AS type,
		          CASE WHEN jsonb_typeof(e -> 'grams') = 'number' THEN CAST(e ->> 'grams' AS numeric) ELSE 0 END AS grams
		     FROM rec, jsonb_array_elements(rec.weights) AS e
		    WHERE jsonb_typeof(rec.weights) = 'array'
		 )
		 SELECT (SELECT count(*) FROM rec) AS recorded, el.type, count(DISTINCT el.wheel_id) AS wheels,
		        count(*) AS weights, sum(el.grams) AS total,
		        ${r1('sum(el.grams) / count(DISTINCT el.wheel_id)')} AS per_using,
		        ${r1('sum(el.grams) / (SELECT count(*) FROM rec)')} AS per_recorded
		   FROM el GROUP BY el.type ORDER BY el.type`,
		{ store: storeId, from: range.from, to: range.to }
	);
	let recordedWheels = Number(rows[0]?.recorded ?? 0);
	if (rows.length === 0) {
		const counted = await db().raw(
			`SELECT count(*) AS recorded FROM wheel_records r JOIN wheels w ON w.id = r.wheel_id
			   JOIN jobs j ON j.id = w.job_id JOIN stores s ON s.id = j.store_id
			  WHERE j.store_id = :store AND w.state = 'done' AND ${inRange('w.finished_at')}`,
			{ store: storeId, from: range.from, to: range.to }
		);
		recordedWheels = Number(counted.rows[0].recorded);
	}
	return {
		recordedWheels,
		rows: rows.map((r: Record<string, unknown>) => ({
			type: String(r.type),
			wheels: Number(r.wheels),
			weights: Number(r.weights),
			totalGrams: Number(r.total),
			gramsPerWheelUsing: Number(r.per_using),
			gramsPerRecordedWheel: Number(r.per_recorded)
		}))
	};
}

// (g) Tire ages ------------------------------------------------------------------------------------------------------

export interface AgeRow {
	/** Whole years from the week of manufacture (DOT code's last four digits, WWYY) to the day the wheel was done;
	 * '10+' for ten and over; 'unreadable' when the last four digits are not a week 01–53 and a year, or name a week
	 * after the work. */
	years: string;
	wheels: number;
}

export async function tireAges(storeId: number, range: ReportRange): Promise<AgeRow[]> {
	const { rows } = await db().raw(
		`WITH coded AS (
		   SELECT w.finished_at, substring(regexp_replace(r.dot_code, '\\s', '', 'g') from '(\\d{4})$') AS wwyy
		     FROM wheel_records r
		     JOIN wheels w ON w.id = r.wheel_id
		     JOIN jobs j ON j.id = w.job_id
		     JOIN stores s ON s.id = j.store_id
		    WHERE j.store_id = :store AND w.state = 'done' AND ${inRange('w.finished_at')}
		      AND coalesce(r.dot_code, '') <> ''
		 ), dated AS (
		   SELECT finished_at,
		          CASE WHEN wwyy IS NOT NULL AND CAST(substr(wwyy, 1, 2) AS int) BETWEEN 1 AND 53
		               THEN make_date(2000 + CAST(substr(wwyy, 3, 2) AS int), 1, 4) + 7 * (CAST(substr(wwyy, 1, 2) AS int) - 1)
		          END AS made
		     FROM coded
		 ), aged AS (
		   SELECT CASE WHEN made IS NULL OR made > CAST(finished_at AS date) THEN NULL
		               ELSE floor((CAST(finished_at AS date) - made) / 365.25) END AS age
		     FROM dated
		 )
		 SELECT CASE WHEN age IS NULL THEN 'unreadable' WHEN age >= 10 THEN '10+' ELSE CAST(CAST(age AS int) AS text) END AS years,
		        count(*) AS wheels, min(coalesce(age, 99)) AS sort
		   FROM aged GROUP BY 1 ORDER BY 3`,
		{ store: storeId, from: range.from, to: range.to }
	);
	return rows.map((r: Record<string, unknown>) => ({ years: String(r.years), wheels: Number(r.wheels) }));
}

// CSV tables ---------------------------------------------------------------------------------------------------------

export type Cell = string | number | null;
export interface Table {
	header: string[];
	rows: Cell[][];
}

export async function table(name: ReportName, storeId: number, range: ReportRange): Promise<Table> {
	switch (name) {
		case 'throughput': {
			const t = await throughput(storeId, range);
			return {
				header: ['hour', 'wheels', 'wheels_per_day', 'capacity_per_hour', 'percent_of_capacity'],
				rows: t.hours.map((h) => [h.hour, h.wheels, h.perDay, h.capacity, h.percentOfCapacity])
			};
		}
		case 'pace': {
			const p = await pace(storeId, range);
			return {
				header: ['by', 'key', 'wheels', 'avg_minutes_per_wheel', 'target_minutes', 'minutes_vs_target'],
				rows: p.rows.map((r) => [r.by, r.key, r.wheels, r.avgMinutes, p.targetMinPerWheel, r.vsTarget])
			};
		}
		case 'promises': {
			const p = await promises(storeId, range);
			return {
				header: ['jobs', 'kept', 'late', 'late_still_open', 'kept_percent', 'avg_late_minutes', 'max_late_minutes'],
				rows: [[p.jobs, p.kept, p.late, p.stillOpen, p.keptPercent, p.avgLateMinutes, p.maxLateMinutes]]
			};
		}
		case 'waiting': {
			const w = await waiting(storeId, range);
			return {
				header: ['jobs', 'not_started', 'avg_minutes', 'p50_minutes', 'p90_minutes', 'max_minutes'],
				rows: [[w.jobs, w.notStarted, w.avgMinutes, w.p50Minutes, w.p90Minutes, w.maxMinutes]]
			};
		}
		case 'weights': {
			const w = await weights(storeId, range);
			return {
				header: ['type', 'wheels', 'weights', 'total_g', 'g_per_wheel_using', 'g_per_recorded_wheel'],
				rows: w.rows.map((r) => [
					r.type,
					r.wheels,
					r.weights,
					r.totalGrams,
					r.gramsPerWheelUsing,
					r.gramsPerRecordedWheel
				])
			};
		}
		case 'ages': {
			const a = await tireAges(storeId, range);
			return { header: ['age_years', 'wheels'], rows: a.map((r) => [r.years, r.wheels]) };
		}
		case 'force': {
			const f = await force(storeId, range);
			return {
				header: ['group', 'wheels', 'avg_before_n', 'avg_after_n', 'limit_n', 'within_limit_percent'],
				rows: f.rows.map((r) => [r.group, r.wheels, r.avgBeforeN, r.avgAfterN, f.limitN, r.withinLimitPercent])
			};
		}
	}
}

// What the manager's CSV exports of one store hold: its jobs and its wheel records for jobs taken in over a range of
// days (in the store's time zone). Values stay SI; times are the store's local time as `YYYY-MM-DD HH:MM`. The
// vehicle data's export is db/vehicles.ts `all()`, in the import's own format.
import type { CsvValue } from '../csv';
import type { ExportRange } from '$lib/schemas/exports';
import { db } from './index';

export interface Table {
	header: string[];
	rows: CsvValue[][];
}

const local = (column: string) => `to_char(${column} AT TIME ZONE s.timezone, 'YYYY-MM-DD HH24:MI')`;

/** Jobs created from the first day's midnight to the end of the last day, where the store is. (CAST, not `::`:
 * Knex reads `:name::type` as an identifier binding.) */
const IN_RANGE = `j.store_id = :store
	AND j.created_at >= CAST(CAST(:from AS date) AS timestamp) AT TIME ZONE s.timezone
	AND j.created_at < CAST(CAST(:to AS date) + 1 AS timestamp) AT TIME ZONE s.timezone`;

const jobColumns = [
	'job_number',
	'state',
	'kind',
	'created_local',
	'promised_local',
	'started_local',
	'done_local',
	'collected_local',
	'customer',
	'plate',
	'vehicle',
	'services',
	'wheels',
	'wheels_done',
	'priority',
	'created_by',
	'notes'
];

export async function jobs(storeId: number, range: ExportRange): Promise<Table> {
	const { rows } = await db().raw(
		`SELECT j.number AS job_number, j.state, j.kind,
		        ${local('j.created_at')} AS created_local, ${local('j.promised_at')} AS promised_local,
		        ${local('j.started_at')} AS started_local, ${local('j.done_at')} AS done_local,
		        ${local('j.collected_at')} AS collected_local,
		        c.name AS customer, cv.plate,
		        CASE WHEN v.id IS NULL THEN NULL
		             ELSE concat_ws(' ', v.year_from || '–' || v.year_to, v.make, v.model, nullif(v."trim", '')) END AS vehicle,
		        (SELECT string_agg(sv.code, ' ' ORDER BY sv.position, sv.code)
		           FROM job_services js JOIN services sv ON sv.id = js.service_id WHERE js.job_id = j.id) AS services,
		        (SELECT count(*) FROM wheels w WHERE w.job_id = j.id) AS wheels,
		        (SELECT count(*) FROM wheels w WHERE w.job_id = j.id AND w.state = 'done') AS wheels_done,
		        j.priority, u.name AS created_by, j.notes
		   FROM jobs j
		   JOIN stores s ON s.id = j.store_id
		   JOIN customers c ON c.id = j.customer_id
		   LEFT JOIN customer_vehicles cv ON cv.id = j.customer_vehicle_id
		   LEFT JOIN vehicles v ON v.id = j.vehicle_id
		   LEFT JOIN users u ON u.id = j.created_by
		  WHERE ${IN_RANGE}
		  ORDER BY j.created_at, j.number`,
		{ store: storeId, from: range.from, to: range.to }
	);
	return { header: jobColumns, rows: rows.map((r: Record<string, CsvValue>) => jobColumns.map((c) => r[c])) };
}

const recordColumns = [
	'job_number',
	'job_created_local',
	'wheel_position',
	'bay',
	'technician',
	'wheel_state',
	'started_local',
	'finished_local',
	'tread_depth_mm',
	'dot_code',
	'pressure_set_kpa',
	'weight_inner_g',
	'weight_outer_g',
	'weights',
	'force_before_n',
	'force_after_n',
	'match_mounted',
	'match_mount_deg',
	'torque_applied_nm',
	'tire_damage',
	'rim_damage',
	'puncture',
	'notes',
	'recorded_by',
	'recorded_local'
];

interface Weight {
	plane: string;
	type: string;
	grams: number;
	angleDeg: number;
}

interface Damage {
	tire?: string[];
	rim?: string[];
	puncture?: { location: string; diameterMm: number; angled?: boolean };
}

/** Weights as one readable cell: `inner clip 25 g at 90°; outer adhesive 30 g at 270°`. */
const weightsText = (weights: Weight[]) =>
	weights.map((w) => `${w.plane} ${w.type} ${w.grams} g at ${w.angleDeg}°`).join('; ');

const gramsOn = (weights: Weight[], plane: string) => {
	const on = weights.filter((w) => w.plane === plane);
	return on.length ? Math.round(on.reduce((sum, w) => sum + Number(w.grams), 0) * 10) / 10 : null;
};

export async function wheelRecords(storeId: number, range: ExportRange): Promise<Table> {
	const { rows } = await db().raw(
		`SELECT j.number AS job_number, ${local('j.created_at')} AS job_created_local,
		        w.position AS wheel_position, b.code AS bay, t.name AS technician, w.state AS wheel_state,
		        ${local('w.started_at')} AS started_local, ${local('w.finished_at')} AS finished_local,
		        r.tread_depth_mm, r.dot_code, r.pressure_set_kpa, r.weights, r.force_before_n, r.force_after_n,
		        r.match_mounted, r.match_mount_deg, r.torque_applied_nm, r.damage, r.notes,
		        rb.name AS recorded_by, ${local('r.updated_at')} AS recorded_local
		   FROM wheel_records r
		   JOIN wheels w ON w.id = r.wheel_id
		   JOIN jobs j ON j.id = w.job_id
		   JOIN stores s ON s.id = j.store_id
		   LEFT JOIN bays b ON b.id = w.bay_id
		   LEFT JOIN users t ON t.id = w.tech_id
		   LEFT JOIN users rb ON rb.id = r.recorded_by
		  WHERE ${IN_RANGE}
		  ORDER BY j.created_at, j.number, array_position(ARRAY['LF', 'RF', 'LR', 'RR', 'SP'], w.position)`,
		{ store: storeId, from: range.from, to: range.to }
	);
	return {
		header: recordColumns,
		rows: rows.map((r: Record<string, unknown>) => {
			const weights = (r.weights as Weight[]) ?? [];
			const damage = (r.damage as Damage) ?? {};
			const p = damage.puncture;
			const cells: Record<string, CsvValue> = {
				...(r as Record<string, CsvValue>),
				weight_inner_g: gramsOn(weights, 'inner'),
				weight_outer_g: gramsOn(weights, 'outer'),
				weights: weightsText(weights),
				match_mounted: Boolean(r.match_mounted),
				tire_damage: (damage.tire ?? []).join('; '),
				rim_damage: (damage.rim ?? []).join('; '),
				puncture: p ? `${p.location} ${p.diameterMm} mm${p.angled ? ' angled' : ''}` : ''
			};
			return recordColumns.map((c) => cells[c]);
		})
	};
}

// How jobs, wheels and bays look on a screen: one SQL shape each, used by the board snapshot, the API answers and
// the events, so a screen sees the same fields whichever way a row reached it.
import type { Knex } from 'knex';
import type { BayView, JobDetail, JobView, WheelView } from '$lib/schemas/floor';

const NOTES_PREVIEW = 280;

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

/** Jobs by id, or every job on a store's floor (`{ floorOf: storeId }`): not finished, or finished in the last day. */
export async function jobViews(
	q: Knex | Knex.Transaction,
	which: readonly number[] | { floorOf: number }
): Promise<JobView[]> {
	if (Array.isArray(which) && which.length === 0) return [];
	const where = Array.isArray(which)
		? { sql: 'j.id = ANY(?)', bindings: [[...which]] }
		: {
				sql: `j.store_id = ? AND (j.state IN ('waiting', 'in_progress') OR (j.state = 'done' AND j.done_at > now() - interval '1 day'))`,
				bindings: [(which as { floorOf: number }).floorOf]
			};
	const { rows } = await q.raw(
		`SELECT j.id, j.number, j.state, j.kind, j.promised_at, j.priority, left(j.notes, ?) AS notes_preview, j.version,
		        j.created_at, j.started_at, j.done_at, c.id AS customer_id, c.name AS customer_name, c.phone AS customer_phone,
		        v.id AS vehicle_id,
		        CASE WHEN v.id IS NULL THEN NULL ELSE concat_ws(' ', v.year_from || '–' || v.year_to, v.make, v.model, nullif(v.trim, '')) END AS vehicle_label,
		        coalesce(cv.plate, '') AS plate,
		        coalesce((SELECT array_agg(s.code ORDER BY s.position, s.code) FROM job_services js
		                  JOIN services s ON s.id = js.service_id WHERE js.job_id = j.id), '{}') AS services
		   FROM jobs j
		   JOIN customers c ON c.id = j.customer_id
		   LEFT JOIN vehicles v ON v.id = j.vehicle_id
		   LEFT JOIN customer_vehicles cv ON cv.id = j.customer_vehicle_id
		  WHERE ${where.sql}
		  ORDER BY j.promised_at, j.id`,
		[NOTES_PREVIEW, ...where.bindings]
	);
	return rows.map((r: Record<string, never>): JobView => ({
		id: r.id,
		number: r.number,
		state: r.state,
		kind: r.kind,
		promisedAt: iso(r.promised_at)!,
		priority: r.priority,
		notesPreview: r.notes_preview,
		version: r.version,
		createdAt: iso(r.created_at)!,
		startedAt: iso(r.started_at),
		doneAt: iso(r.done_at),
		customer: { id: r.customer_id, name: r.customer_name, phone: r.customer_phone },
		vehicle: r.vehicle_id ? { id: r.vehicle_id, label: r.vehicle_label } : null,
		plate: r.plate,
		services: r.services
	}));
}

export async function jobDetail(q: Knex | Knex.Transaction, id: number): Promise<JobDetail | undefined> {
	const [view] = await jobViews(q, [id]);
	if (!view) return undefined;
	const { notes } = await q('jobs').select('notes').where({ id }).first();
	const wheels = await wheelViewsOfJobs(q, [id]);
	return { ...view, notes, wheels };
}

const wheelColumns = [
	'id',
	'job_id',
	'position',
	'bay_id',
	'queue_position',
	'state',
	'tech_id',
	'started_at',
	'finished_at',
	'version'
] as const;

export function toWheelView(r: Record<string, never>): WheelView {
	return {
		id: r.id,
		jobId: r.job_id,
		position: r.position,
		bayId: r.bay_id,
		queuePosition: r.queue_position,
		state: r.state,
		techId: r.tech_id,
		startedAt: iso(r.started_at),
		finishedAt: iso(r.finished_at),
		version: r.version
	};
}

const positionOrder = `array_position(ARRAY['LF','RF','LR','RR','SP'], position)`;

export async function wheelViews(q: Knex | Knex.Transaction, ids: readonly number[]): Promise<WheelView[]> {
	if (ids.length === 0) return [];
	const rows = await q('wheels')
		.select(wheelColumns)
		.whereRaw('id = ANY(?)', [[...ids]])
		.orderByRaw(`job_id, ${positionOrder}`);
	return rows.map(toWheelView);
}

export async function wheelViewsOfJobs(q: Knex | Knex.Transaction, jobIds: readonly number[]): Promise<WheelView[]> {
	if (jobIds.length === 0) return [];
	const rows = await q('wheels')
		.select(wheelColumns)
		.whereRaw('job_id = ANY(?)', [[...jobIds]])
		.orderByRaw(`job_id, ${positionOrder}`);
	return rows.map(toWheelView);
}

export async function bayViews(
	q: Knex | Knex.Transaction,
	storeId: number,
	ids?: readonly number[]
): Promise<BayView[]> {
	const query = q('bays as b')
		.leftJoin('users as u', 'u.id', 'b.tech_id')
		.select('b.id', 'b.code', 'b.name', 'b.position', 'b.active', 'b.tech_id', 'u.name as tech_name')
		.where('b.store_id', storeId)
		.orderBy('b.position');
	if (ids) query.whereIn('b.id', ids);
	const rows = await query;
	return rows.map((r: Record<string, never>) => ({
		id: r.id,
		code: r.code,
		name: r.name,
		position: r.position,
		active: r.active,
		techId: r.tech_id,
		techName: r.tech_name
	}));
}

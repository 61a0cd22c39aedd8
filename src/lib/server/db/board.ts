// The store's floor in one consistent snapshot, with the cursor (newest event id) it includes. Read in one
// REPEATABLE READ transaction: since events commit in id order (see live/events.ts), every event up to the cursor
// is in the snapshot and none after it.
import type { BoardSnapshot, WheelView } from '$lib/schemas/floor';
import { NotFound } from '../errors';
import { db } from './index';
import { bayViews, jobViews, wheelViewsOfJobs } from './views';

export async function snapshot(storeId: number): Promise<BoardSnapshot> {
	return db().transaction(
		async (trx) => {
			const store = await trx('stores')
				.select('id', 'name', 'timezone', 'target_min_per_wheel', 'units')
				.where({ id: storeId })
				.first();
			if (!store) throw new NotFound('Your store no longer exists.');
			const bays = await bayViews(trx, storeId);
			const jobs = await jobViews(trx, { floorOf: storeId });
			const wheels = await wheelViewsOfJobs(
				trx,
				jobs.map((j) => j.id)
			);
			const counters = await trx.raw(
				`WITH today AS (SELECT (now() AT TIME ZONE s.timezone)::date AS d, s.timezone AS tz FROM stores s WHERE s.id = ?)
				 SELECT
				   (SELECT count(*) FROM wheels w JOIN jobs j ON j.id = w.job_id, today
				     WHERE j.store_id = ? AND w.state = 'done' AND (w.finished_at AT TIME ZONE today.tz)::date = today.d)::int AS done,
				   (SELECT count(*) FROM wheels w JOIN jobs j ON j.id = w.job_id, today
				     WHERE j.store_id = ? AND j.state <> 'cancelled' AND (j.promised_at AT TIME ZONE today.tz)::date = today.d)::int AS planned,
				   (SELECT avg(EXTRACT(EPOCH FROM (w.finished_at - w.started_at)) / 60) FROM wheels w JOIN jobs j ON j.id = w.job_id, today
				     WHERE j.store_id = ? AND w.state = 'done' AND (w.finished_at AT TIME ZONE today.tz)::date = today.d) AS min_per_wheel,
				   -- Any id up to the newest is a valid resume point: events commit in id order, and replay filters by store.
				   -- Never below the pruned mark, or a store quiet for longer than the kept window could never resume.
				   greatest((SELECT coalesce(max(id), 0) FROM events), (SELECT events_pruned_to FROM stores WHERE id = ?)) AS cursor`,
				[storeId, storeId, storeId, storeId, storeId]
			);
			const c = counters.rows[0];
			const lanes = new Map<number, WheelView[]>();
			for (const w of wheels) {
				if (w.bayId !== null && w.state !== 'done') lanes.set(w.bayId, [...(lanes.get(w.bayId) ?? []), w]);
			}
			const waitingWheels = new Map<number, number[]>();
			for (const w of wheels) {
				if (w.bayId === null && w.state === 'queued')
					waitingWheels.set(w.jobId, [...(waitingWheels.get(w.jobId) ?? []), w.id]);
			}
			return {
				store: {
					id: store.id,
					name: store.name,
					timezone: store.timezone,
					targetMinPerWheel: store.target_min_per_wheel,
					units: store.units
				},
				bays: bays.map((b) => ({
					...b,
					wheelIds: (lanes.get(b.id) ?? [])
						.sort((x, y) => (x.queuePosition ?? 0) - (y.queuePosition ?? 0))
						.map((w) => w.id)
				})),
				// jobViews is ordered by promised time, so the waiting line is too.
				waiting: jobs
					.filter((j) => waitingWheels.has(j.id))
					.map((j) => ({ jobId: j.id, wheelIds: waitingWheels.get(j.id)! })),
				jobs,
				wheels,
				counters: {
					wheelsDone: c.done,
					wheelsPlanned: c.planned,
					minPerWheel: c.min_per_wheel === null ? null : Math.round(Number(c.min_per_wheel) * 10) / 10
				},
				cursor: Number(c.cursor)
			};
		},
		{ isolationLevel: 'repeatable read', readOnly: true }
	);
}

/** The store's events after a cursor, in id order, a page at a time (the stream's replay). */
export async function eventsAfter(storeId: number, cursor: number, limit = 1000) {
	return db()('events')
		.select('id', 'store_id', 'type', 'payload', 'created_at')
		.where('store_id', storeId)
		.andWhere('id', '>', cursor)
		.orderBy('id')
		.limit(limit);
}

/** Whether a cursor can be resumed: not older than the kept window, not newer than anything this database has. */
export async function cursorState(storeId: number, cursor: number): Promise<'ok' | 'too_old' | 'unknown'> {
	const row = await db()('stores')
		.select('events_pruned_to', db().raw('(SELECT coalesce(max(id), 0) FROM events) AS newest'))
		.where({ id: storeId })
		.first();
	if (!row) return 'unknown';
	if (cursor < Number(row.events_pruned_to)) return 'too_old';
	if (cursor > Number(row.newest)) return 'unknown';
	return 'ok';
}

/** Drops events older than the kept window and remembers, per store, the newest id dropped. */
export async function pruneEvents(keepHours = 48): Promise<number> {
	const { rows } = await db().raw(
		`WITH gone AS (DELETE FROM events WHERE created_at < now() - make_interval(hours => ?) RETURNING id, store_id),
		      per_store AS (SELECT store_id, max(id) AS max_id, count(*) AS n FROM gone GROUP BY store_id),
		      marked AS (UPDATE stores s SET events_pruned_to = greatest(s.events_pruned_to, p.max_id)
		                   FROM per_store p WHERE s.id = p.store_id RETURNING p.n)
		 SELECT coalesce(sum(n), 0)::int AS n FROM marked`,
		[keepHours]
	);
	return rows[0].n;
}

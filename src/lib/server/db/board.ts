// The store's floor in one consistent snapshot, with the cursor (newest event id) it includes. Read in one
// REPEATABLE READ transaction: since events commit in id order (see live/events.ts), every event up to the cursor
// is in the snapshot and none after it.
import type { BoardSnapshot } from '$lib/schemas/floor';
import { NotFound } from '../errors';
import { db } from './index';

/**
 * The snapshot as JSON text, built entirely in PostgreSQL: with a thousand wheels on the floor, turning rows into
 * objects and back into JSON in the app cost more than the queries themselves. Same shape as BoardSnapshot.
 */
export async function snapshotJson(storeId: number): Promise<string> {
	return db().transaction(
		async (trx) => {
			const { rows } = await trx.raw(
				`WITH s AS (
				   SELECT id, name, timezone, target_min_per_wheel, events_pruned_to, (now() AT TIME ZONE timezone)::date AS today
				     FROM stores WHERE id = :store
				 ), floor_jobs AS (
				   SELECT id, promised_at FROM jobs
				    WHERE store_id = :store
				      AND (state IN ('waiting', 'in_progress') OR (state = 'done' AND done_at > now() - interval '1 day'))
				 ), job_docs AS (
				   SELECT j.id, j.promised_at, json_build_object(
				     'id', j.id, 'number', j.number, 'state', j.state, 'kind', j.kind, 'promisedAt', lugline_iso(j.promised_at),
				     'priority', j.priority, 'notesPreview', left(j.notes, 280), 'version', j.version,
				     'createdAt', lugline_iso(j.created_at), 'startedAt', lugline_iso(j.started_at), 'doneAt', lugline_iso(j.done_at),
				     'customer', json_build_object('id', c.id, 'name', c.name, 'phone', c.phone),
				     'vehicle', CASE WHEN v.id IS NULL THEN NULL ELSE json_build_object('id', v.id,
				       'label', concat_ws(' ', v.year_from || '–' || v.year_to, v.make, v.model, nullif(v.trim, ''))) END,
				     'plate', coalesce(cv.plate, ''),
				     'services', coalesce((SELECT json_agg(sv.code ORDER BY sv.position, sv.code) FROM job_services js
				                            JOIN services sv ON sv.id = js.service_id WHERE js.job_id = j.id), '[]')) AS doc
				     FROM jobs j JOIN floor_jobs f ON f.id = j.id
				     JOIN customers c ON c.id = j.customer_id
				     LEFT JOIN vehicles v ON v.id = j.vehicle_id
				     LEFT JOIN customer_vehicles cv ON cv.id = j.customer_vehicle_id
				 ), today_wheels AS (
				   SELECT w.state, w.started_at, w.finished_at, j.state AS job_state, j.promised_at
				     FROM wheels w JOIN jobs j ON j.id = w.job_id, s
				    WHERE j.store_id = :store
				      AND ((w.finished_at AT TIME ZONE s.timezone)::date = s.today OR (j.promised_at AT TIME ZONE s.timezone)::date = s.today)
				 )
				 SELECT json_build_object(
				   'store', (SELECT json_build_object('id', id, 'name', name, 'timezone', timezone, 'targetMinPerWheel', target_min_per_wheel) FROM s),
				   'bays', (SELECT coalesce(json_agg(json_build_object('id', b.id, 'code', b.code, 'name', b.name, 'position', b.position,
				              'active', b.active, 'techId', b.tech_id, 'techName', u.name,
				              'wheelIds', coalesce((SELECT json_agg(w.id ORDER BY w.queue_position) FROM wheels w
				                                     WHERE w.bay_id = b.id AND w.state <> 'done'), '[]')) ORDER BY b.position), '[]')
				              FROM bays b LEFT JOIN users u ON u.id = b.tech_id WHERE b.store_id = :store),
				   'waiting', (SELECT coalesce(json_agg(json_build_object('jobId', x.id, 'wheelIds', x.wheel_ids) ORDER BY x.promised_at, x.id), '[]')
				                 FROM (SELECT f.id, f.promised_at, json_agg(w.id ORDER BY array_position(ARRAY['LF','RF','LR','RR','SP'], w.position)) AS wheel_ids
				                         FROM floor_jobs f JOIN wheels w ON w.job_id = f.id
				                        WHERE w.bay_id IS NULL AND w.state = 'queued' GROUP BY f.id, f.promised_at) x),
				   'jobs', (SELECT coalesce(json_agg(doc ORDER BY promised_at, id), '[]') FROM job_docs),
				   'wheels', (SELECT coalesce(json_agg(lugline_wheel_json(w) ORDER BY w.job_id, array_position(ARRAY['LF','RF','LR','RR','SP'], w.position)), '[]')
				                FROM wheels w WHERE w.job_id IN (SELECT id FROM floor_jobs)),
				   'counters', (SELECT json_build_object(
				       'wheelsDone', count(*) FILTER (WHERE state = 'done' AND (finished_at AT TIME ZONE (SELECT timezone FROM s))::date = (SELECT today FROM s)),
				       'wheelsPlanned', count(*) FILTER (WHERE job_state <> 'cancelled' AND (promised_at AT TIME ZONE (SELECT timezone FROM s))::date = (SELECT today FROM s)),
				       'minPerWheel', round((avg(EXTRACT(EPOCH FROM (finished_at - started_at)) / 60)
				                       FILTER (WHERE state = 'done' AND (finished_at AT TIME ZONE (SELECT timezone FROM s))::date = (SELECT today FROM s)))::numeric, 1))
				     FROM today_wheels),
				   -- Any id up to the newest is a valid resume point: events commit in id order, and replay filters by store.
				   -- Never below the pruned mark, or a store quiet for longer than the kept window could never resume.
				   'cursor', greatest((SELECT coalesce(max(id), 0) FROM events), (SELECT events_pruned_to FROM s))
				 )::text AS doc, (SELECT count(*) FROM s) AS found`,
				{ store: storeId }
			);
			if (!Number(rows[0].found)) throw new NotFound('Your store no longer exists.');
			return rows[0].doc as string;
		},
		{ isolationLevel: 'repeatable read', readOnly: true }
	);
}

export async function snapshot(storeId: number): Promise<BoardSnapshot> {
	return JSON.parse(await snapshotJson(storeId)) as BoardSnapshot;
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

// JSON helpers, and a move of wheels between bays as one server-side function: the floor's hottest write in one round trip (system
// calls are costly on small virtual machines, and a move used to take nine). The same rules as before, in SQL:
//   lock order bays → jobs → wheels → events lock; all or none; queued and working wheels keep places 1..n, working
//   first; renumbered neighbours keep their version; the event and the audit row are written in the same call.
// Refusals are raised with our own SQLSTATEs, which src/lib/server/db/queues.ts turns into 404/409/422:
//   LG404 not found in this store · LG409 stale version · LG422 not allowed now (the message says why).
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	// Instants in JSON the way JavaScript writes them (toISOString), so rows read either way compare equal.
	await knex.raw(`
		CREATE FUNCTION lugline_iso(t timestamptz) RETURNS text LANGUAGE sql STABLE AS $$
			SELECT to_char(t AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')
		$$`);
	await knex.raw(`
		CREATE FUNCTION lugline_wheel_json(w wheels) RETURNS jsonb LANGUAGE sql STABLE AS $$
			SELECT jsonb_build_object(
				'id', w.id, 'jobId', w.job_id, 'position', w.position, 'bayId', w.bay_id, 'queuePosition', w.queue_position,
				'state', w.state, 'techId', w.tech_id,
				'startedAt', lugline_iso(w.started_at), 'finishedAt', lugline_iso(w.finished_at),
				'version', w.version)
		$$`);
	await knex.raw(`
		CREATE FUNCTION lugline_move_wheels(p_store integer, p_user integer, p_ids integer[], p_versions integer[],
		                                    p_bay integer, p_place integer)
		RETURNS jsonb LANGUAGE plpgsql AS $$
		DECLARE
			r record;
			dest_store integer;
			dest_code text := 'waiting';
			dest_active boolean := true;
			b integer;
			rest integer[];
			lane integer[];
			working integer;
			at_ integer;
			touched integer[];
			changed integer[] := '{}';
			views jsonb;
			event_id bigint;
		BEGIN
			PERFORM 1 FROM bays
			  WHERE id IN (SELECT bay_id FROM wheels WHERE id = ANY(p_ids) AND bay_id IS NOT NULL) OR id = p_bay
			  ORDER BY id FOR UPDATE;
			IF p_bay IS NOT NULL THEN
				SELECT code, active, store_id INTO dest_code, dest_active, dest_store FROM bays WHERE id = p_bay;
				IF NOT FOUND OR dest_store <> p_store THEN
					RAISE EXCEPTION 'No such bay in your store.' USING ERRCODE = 'LG404';
				END IF;
			END IF;
			PERFORM 1 FROM jobs j JOIN wheels w ON w.job_id = j.id WHERE w.id = ANY(p_ids)
			  ORDER BY j.id, w.id FOR UPDATE OF j, w;
			IF (SELECT count(*) FROM wheels w JOIN jobs j ON j.id = w.job_id
			     WHERE w.id = ANY(p_ids) AND j.store_id = p_store) <> cardinality(p_ids) THEN
				RAISE EXCEPTION 'No such wheel in your store.' USING ERRCODE = 'LG404';
			END IF;
			IF EXISTS (SELECT 1 FROM unnest(p_ids, p_versions) AS v(id, version) JOIN wheels w ON w.id = v.id
			            WHERE w.version <> v.version) THEN
				RAISE EXCEPTION 'stale version' USING ERRCODE = 'LG409';
			END IF;
			FOR r IN SELECT w.position, w.state, j.number, j.state AS job_state
			           FROM wheels w JOIN jobs j ON j.id = w.job_id WHERE w.id = ANY(p_ids) ORDER BY w.id LOOP
				IF r.job_state IN ('cancelled', 'collected') THEN
					RAISE EXCEPTION 'Job % is %: its wheels stay where they are.', r.number, r.job_state USING ERRCODE = 'LG422';
				END IF;
				IF r.state <> 'queued' THEN
					RAISE EXCEPTION 'Wheel % of job % is %: only queued wheels move.', r.position, r.number,
					  CASE r.state WHEN 'working' THEN 'being worked on' ELSE 'done' END USING ERRCODE = 'LG422';
				END IF;
			END LOOP;
			IF NOT dest_active THEN
				RAISE EXCEPTION 'Bay % is out of service.', dest_code USING ERRCODE = 'LG422';
			END IF;

			FOR b IN SELECT DISTINCT x FROM unnest(ARRAY(SELECT bay_id FROM wheels WHERE id = ANY(p_ids)) || p_bay) AS x
			         WHERE x IS NOT NULL ORDER BY x LOOP
				SELECT coalesce(array_agg(id ORDER BY (state = 'working') DESC, queue_position NULLS LAST, id), '{}'),
				       count(*) FILTER (WHERE state = 'working')
				  INTO rest, working
				  FROM wheels WHERE bay_id = b AND state <> 'done' AND NOT (id = ANY(p_ids));
				lane := rest;
				IF b = p_bay THEN
					at_ := least(greatest(coalesce(p_place, cardinality(rest) + 1) - 1, working), cardinality(rest));
					lane := rest[1:at_] || p_ids || rest[at_ + 1:];
				END IF;
				WITH u AS (
					UPDATE wheels w SET bay_id = b, queue_position = o.place,
					       version = w.version + CASE WHEN w.id = ANY(p_ids) THEN 1 ELSE 0 END,
					       updated_at = CASE WHEN w.id = ANY(p_ids) THEN now() ELSE w.updated_at END
					  FROM unnest(lane) WITH ORDINALITY AS o(id, place)
					 WHERE w.id = o.id AND (w.id = ANY(p_ids) OR w.queue_position IS DISTINCT FROM o.place::integer)
					RETURNING w.id)
				SELECT coalesce(array_agg(id), '{}') INTO touched FROM u;
				changed := changed || touched;
			END LOOP;
			IF p_bay IS NULL THEN
				UPDATE wheels SET bay_id = NULL, queue_position = NULL, version = version + 1, updated_at = now()
				 WHERE id = ANY(p_ids);
				changed := changed || p_ids;
			END IF;

			SELECT jsonb_agg(lugline_wheel_json(w) ORDER BY w.job_id, array_position(ARRAY['LF','RF','LR','RR','SP'], w.position))
			  INTO views FROM wheels w WHERE w.id = ANY(changed);
			INSERT INTO audit (store_id, user_id, action, entity, entity_id, detail)
			VALUES (p_store, p_user, 'move', 'wheel', p_ids[1],
			        jsonb_build_object('wheels', to_jsonb(p_ids), 'to', dest_code, 'at', p_place));
			event_id := lugline_append_event(p_store, CASE cardinality(p_ids) WHEN 1 THEN 'wheel.moved' ELSE 'wheels.moved' END,
			                                 'wheel', p_ids[1], jsonb_build_object('jobs', '[]'::jsonb, 'wheels', views, 'bays', '[]'::jsonb));
			RETURN jsonb_build_object('wheels', views, 'eventId', event_id);
		END
		$$`);
}

export async function down(knex: Knex): Promise<void> {
	await knex.raw('DROP FUNCTION IF EXISTS lugline_move_wheels(integer, integer, integer[], integer[], integer, integer)');
	await knex.raw('DROP FUNCTION IF EXISTS lugline_wheel_json(wheels)');
	await knex.raw('DROP FUNCTION IF EXISTS lugline_iso(timestamptz)');
}

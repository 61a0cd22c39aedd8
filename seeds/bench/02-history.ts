// A year of invented history for the bench store (issue 8's report bench): 365 days before today, about 170 jobs a
// day with four wheels each (≈ 250,000 wheels, all done, each with a wheel record), written by a few set-based
// statements so the seed stays quick. Times are plain UTC working hours; the reports read them in the store's zone.
// Idempotent by skipping: it does nothing when the bench store already has jobs older than two days.
import type { Knex } from 'knex';

const JOBS_PER_DAY = 170;
const DAYS = 365;

export async function seed(knex: Knex): Promise<void> {
	const store = await knex('stores').select('id', 'next_job_number').where({ slug: 'bench' }).first();
	if (!store) return;
	const old = await knex('jobs')
		.where({ store_id: store.id })
		.where('created_at', '<', knex.raw("now() - interval '2 days'"))
		.first('id');
	if (old) return;
	const started = performance.now();
	await knex.transaction(async (trx) => {
		// setseed makes random() repeatable, so two bench databases hold the same history.
		await trx.raw('SELECT setseed(0.20261202)');
		await trx.raw(
			`CREATE TEMP TABLE hist_jobs ON COMMIT DROP AS
			 WITH days AS (SELECT d::date AS day FROM generate_series(current_date - ?::int, current_date - 1, interval '1 day') d),
			      slots AS (SELECT day, n FROM days, generate_series(1, ?::int) n),
			      customers AS (SELECT array_agg(id ORDER BY id) AS ids FROM customers WHERE store_id = ?),
			      vehicles AS (SELECT array_agg(id ORDER BY id) AS ids FROM vehicles)
			 SELECT row_number() OVER (ORDER BY day, n) AS seq,
			        c.ids[1 + floor(random() * cardinality(c.ids))::int] AS customer_id,
			        v.ids[1 + floor(random() * cardinality(v.ids))::int] AS vehicle_id,
			        day + time '07:30' + make_interval(mins => floor(random() * 540)::int) AS created_at,
			        floor(random() * 40)::int AS wait_min,
			        60 + floor(random() * 90)::int AS promise_min
			   FROM slots, customers c, vehicles v`,
			[DAYS, JOBS_PER_DAY, store.id]
		);
		await trx.raw(
			`INSERT INTO jobs (store_id, number, customer_id, vehicle_id, kind, state, promised_at, started_at, done_at,
			                   collected_at, created_at, updated_at)
			 SELECT ?, ? + seq, customer_id, vehicle_id, CASE WHEN seq % 3 = 0 THEN 'drop_off' ELSE 'waiter' END, 'collected',
			        created_at + make_interval(mins => promise_min),
			        created_at + make_interval(mins => wait_min),
			        created_at + make_interval(mins => wait_min + 44 + floor(random() * 30)::int),
			        created_at + make_interval(mins => wait_min + 90),
			        created_at, created_at
			   FROM hist_jobs`,
			[store.id, store.next_job_number - 1]
		);
		const last = await trx('jobs').where({ store_id: store.id }).max('number as n').first();
		await trx('stores')
			.where({ id: store.id })
			.update({ next_job_number: Number(last?.n ?? 0) + 1 });
		await trx.raw(
			`INSERT INTO job_services (job_id, service_id)
			 SELECT j.id, sv.id FROM jobs j JOIN services sv ON sv.store_id = j.store_id AND sv.code = 'mount-balance'
			  WHERE j.store_id = ? AND j.created_at < current_date
			 ON CONFLICT DO NOTHING`,
			[store.id]
		);
		// Four wheels a job, one after another in one bay, each 9–16 minutes, by the bay's technician.
		await trx.raw(
			`WITH bays AS (SELECT array_agg(id ORDER BY position) AS ids FROM bays WHERE store_id = ?),
			      techs AS (SELECT array_agg(id ORDER BY id) AS ids FROM users WHERE store_id = ? AND role = 'tech'),
			      jobs_ AS (SELECT j.id, j.started_at, b.ids[1 + (j.id % cardinality(b.ids))] AS bay_id,
			                       t.ids[1 + (j.id % cardinality(t.ids))] AS tech_id
			                  FROM jobs j, bays b, techs t WHERE j.store_id = ? AND j.created_at < current_date
			                   AND NOT EXISTS (SELECT 1 FROM wheels w WHERE w.job_id = j.id))
			 INSERT INTO wheels (job_id, position, bay_id, state, tech_id, started_at, finished_at, created_at, updated_at)
			 SELECT id, p.position, bay_id, 'done', tech_id,
			        started_at + make_interval(mins => (p.i - 1) * 12),
			        started_at + make_interval(mins => (p.i - 1) * 12 + 9 + floor(random() * 8)::int),
			        started_at, started_at
			   FROM jobs_, (VALUES (1, 'LF'), (2, 'RF'), (3, 'LR'), (4, 'RR')) AS p(i, position)`,
			[store.id, store.id, store.id]
		);
		await trx.raw(
			`INSERT INTO wheel_records (wheel_id, tread_depth_mm, dot_code, pressure_set_kpa, weights, force_before_n,
			                            force_after_n, match_mounted, torque_applied_nm, recorded_by, created_at, updated_at)
			 SELECT w.id, round((2 + random() * 7)::numeric, 1),
			        lpad((1 + floor(random() * 52))::text, 2, '0') || lpad((14 + floor(random() * 11))::text, 2, '0'),
			        round((220 + random() * 40)::numeric, 1),
			        jsonb_build_array(jsonb_build_object('plane', 'inner', 'type', CASE WHEN random() < 0.6 THEN 'adhesive' ELSE 'clip' END,
			                                             'grams', 5 * (1 + floor(random() * 8)), 'angleDeg', floor(random() * 360))),
			        round((40 + random() * 120)::numeric, 1), round((30 + random() * 80)::numeric, 1),
			        random() < 0.1, 140, w.tech_id, w.finished_at, w.finished_at
			   FROM wheels w JOIN jobs j ON j.id = w.job_id
			  WHERE j.store_id = ? AND j.created_at < current_date
			    AND NOT EXISTS (SELECT 1 FROM wheel_records r WHERE r.wheel_id = w.id)`,
			[store.id]
		);
	});
	await knex.raw('ANALYZE jobs, wheels, wheel_records, job_services');
	const wheels = await knex('wheels as w')
		.join('jobs as j', 'j.id', 'w.job_id')
		.where('j.store_id', store.id)
		.where('j.created_at', '<', knex.raw('current_date'))
		.count({ n: '*' })
		.first();
	console.log(
		`bench history: ${Number(wheels?.n ?? 0).toLocaleString('en')} done wheels with records over ${DAYS} days in ${Math.round(performance.now() - started) / 1000} s`
	);
}

// The migrations go all the way up, all the way down and up again on an empty database, and the schema's
// constraints refuse impossible states.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../support/database';
import { createScratch, dropScratch, knexCli } from '../support/scratch';

const name = 'lugline_migrations_check';
let url: string;

const appTables = async () =>
	withClient(async (c) => {
		const { rows } = await c.query(
			`SELECT table_name FROM information_schema.tables WHERE table_schema = 'public' AND table_name NOT LIKE 'knex_%' ORDER BY 1`
		);
		return rows.map((r) => r.table_name as string);
	}, url);

const expected = [
	'audit',
	'bay_claims',
	'bays',
	'customer_vehicles',
	'customers',
	'events',
	'job_services',
	'jobs',
	'outbox',
	'photos',
	'services',
	'signin_failures',
	'stores',
	'users',
	'vehicles',
	'wheel_records',
	'wheels'
];

beforeAll(async () => {
	url = await createScratch(name);
});
afterAll(async () => {
	await dropScratch(name);
});

describe('migrations', () => {
	it('latest → rollback --all → latest on an empty database', async () => {
		knexCli(['migrate:latest'], url);
		expect(await appTables()).toEqual(expected);
		knexCli(['migrate:rollback', '--all'], url);
		expect(await appTables()).toEqual([]);
		const extensions = await withClient((c) => c.query("SELECT 1 FROM pg_extension WHERE extname = 'pg_trgm'"), url);
		expect(extensions.rowCount).toBe(0);
		knexCli(['migrate:latest'], url);
		expect(await appTables()).toEqual(expected);
	});

	it('refuses states, positions and roles outside the vocabulary', async () => {
		await withClient(async (c) => {
			await c.query('BEGIN');
			try {
				const store = await c.query(`INSERT INTO stores (slug, name) VALUES ('check', 'Check store') RETURNING id`);
				const storeId = store.rows[0].id;
				await expect(
					c.query(
						`INSERT INTO users (store_id, name, email, role, password_hash) VALUES ($1, 'x', 'x@x.test', 'owner', 'h')`,
						[storeId]
					)
				).rejects.toThrow(/users_role_check/);
				await c.query('ROLLBACK');
				await c.query('BEGIN');
				const s2 = await c.query(`INSERT INTO stores (slug, name) VALUES ('check', 'Check store') RETURNING id`);
				const customer = await c.query(`INSERT INTO customers (store_id, name) VALUES ($1, 'c') RETURNING id`, [
					s2.rows[0].id
				]);
				const job = await c.query(
					`INSERT INTO jobs (store_id, number, customer_id, kind, promised_at) VALUES ($1, 1, $2, 'waiter', now()) RETURNING id, state, version`,
					[s2.rows[0].id, customer.rows[0].id]
				);
				expect(job.rows[0]).toMatchObject({ state: 'waiting', version: 1 });
				await c.query('SAVEPOINT s');
				await expect(
					c.query(`INSERT INTO wheels (job_id, position) VALUES ($1, 'XX')`, [job.rows[0].id])
				).rejects.toThrow(/wheels_position_check/);
				await c.query('ROLLBACK TO SAVEPOINT s');
				await expect(
					c.query(`INSERT INTO wheels (job_id, position, state) VALUES ($1, 'LF', 'working')`, [job.rows[0].id])
				).rejects.toThrow(/wheels_working_in_bay/);
				await c.query('ROLLBACK TO SAVEPOINT s');
				await expect(c.query(`UPDATE jobs SET state = 'parked' WHERE id = $1`, [job.rows[0].id])).rejects.toThrow(
					/jobs_state_check/
				);
			} finally {
				await c.query('ROLLBACK');
			}
		}, url);
	});
});

// The demo seed is idempotent (run twice → the same row counts) and gives the demo the issue asks for.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../support/database';
import { createScratch, dropScratch, knexCli } from '../support/scratch';

const name = 'lugline_seed_check';
let url: string;

const tables = [
	'stores',
	'users',
	'bays',
	'services',
	'vehicles',
	'customers',
	'customer_vehicles',
	'jobs',
	'job_services',
	'wheels',
	'wheel_records'
];

async function counts(): Promise<Record<string, number>> {
	return withClient(async (c) => {
		const out: Record<string, number> = {};
		for (const t of tables) out[t] = Number((await c.query(`SELECT count(*) FROM ${t}`)).rows[0].count);
		return out;
	}, url);
}

beforeAll(async () => {
	url = await createScratch(name);
	knexCli(['migrate:latest'], url);
}, 60_000);
afterAll(async () => {
	await dropScratch(name);
});

describe('demo seed', () => {
	it('gives the same row counts when run twice', { timeout: 120_000 }, async () => {
		knexCli(['seed:run'], url);
		const first = await counts();
		knexCli(['seed:run'], url);
		expect(await counts()).toEqual(first);
	});

	it('holds one demo store with 8 bays, staff for every role and about 300 vehicles and 2,000 customers', async () => {
		const c = await counts();
		expect(c.stores).toBe(1);
		expect(c.bays).toBe(8);
		expect(c.vehicles).toBeGreaterThanOrEqual(250);
		expect(c.vehicles).toBeLessThanOrEqual(400);
		expect(c.customers).toBeGreaterThanOrEqual(1800);
		expect(c.customers).toBeLessThanOrEqual(2500);
		expect(c.jobs).toBeGreaterThanOrEqual(30);
		expect(c.jobs).toBeLessThanOrEqual(60);
		await withClient(async (db) => {
			const store = await db.query('SELECT name FROM stores');
			expect(store.rows[0].name).toMatch(/demo/i);
			const roles = await db.query('SELECT DISTINCT role FROM users ORDER BY role');
			expect(roles.rows.map((r) => r.role)).toEqual(['lead', 'manager', 'tech', 'writer']);
			const sources = await db.query(`SELECT count(*)::int AS n FROM vehicles WHERE source !~* 'demo'`);
			expect(sources.rows[0].n, 'every vehicle record says it is invented demo data').toBe(0);
		}, url);
	});

	it('spreads the rush morning over every job state and every wheel state', async () => {
		await withClient(async (db) => {
			const jobStates = await db.query('SELECT DISTINCT state FROM jobs ORDER BY state');
			expect(jobStates.rows.map((r) => r.state)).toEqual(['cancelled', 'collected', 'done', 'in_progress', 'waiting']);
			const wheelStates = await db.query('SELECT DISTINCT state FROM wheels ORDER BY state');
			expect(wheelStates.rows.map((r) => r.state)).toEqual(['done', 'queued', 'working']);
			const waitingInNoBay = await db.query(
				`SELECT count(*)::int AS n FROM wheels WHERE bay_id IS NULL AND state = 'queued'`
			);
			expect(waitingInNoBay.rows[0].n).toBeGreaterThan(0);
		}, url);
	});
});

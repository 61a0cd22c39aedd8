// Three instances started at the same moment against an empty database, as after a deploy or when every machine
// restarts at once: the migrations run once (one instance takes the advisory lock in src/lib/server/db/migrate.ts,
// the others wait and find nothing to do), and all three are healthy within 60 s.
import { readdirSync } from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import { withClient } from '../support/database';
import { logEntries, startInstances, stopInstances, type Instance } from '../support/instances';
import { createScratch, scratchUrl } from '../support/scratch';

const name = 'lugline_reliability_starts';
let instances: Instance[] = [];

afterAll(async () => {
	await stopInstances(instances);
	await withClient((c) => c.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`), scratchUrl('postgres'));
});

describe('three instances starting at once on an empty database', () => {
	it('migrate once and are all healthy within 60 s', async () => {
		const url = await createScratch(name);
		const started = Date.now();
		instances = await startInstances([3611, 3612, 3613], { DATABASE_URL: url }, { healthyWithinMs: 60_000 });
		const seconds = (Date.now() - started) / 1000;
		console.log(`three instances healthy on an empty database in ${seconds.toFixed(1)} s`);
		expect(seconds).toBeLessThan(60);

		const files = readdirSync('migrations').filter((f) => f.endsWith('.ts'));
		const recorded = await withClient(
			async (c) => (await c.query('SELECT name, batch FROM knex_migrations ORDER BY id')).rows,
			url
		);
		// Every file once, all in one batch: a second instance migrating too would have failed or added a batch.
		expect(recorded.map((r) => r.name).sort()).toEqual(files.sort());
		expect(new Set(recorded.map((r) => r.batch)).size).toBe(1);

		const outcomes = instances.map((i) =>
			logEntries(i)
				.map((e) => String(e.msg))
				.filter((m) => m.startsWith('migrations'))
		);
		expect(outcomes.filter((o) => o.some((m) => m.startsWith('migrations applied'))).length).toBe(1);
		expect(outcomes.filter((o) => o.includes('migrations: already up to date')).length).toBe(2);
		for (const i of instances) {
			const health = await fetch(`${i.url}/api/health`);
			expect(health.status).toBe(200);
			expect(i.process.exitCode).toBeNull();
		}
	});
});

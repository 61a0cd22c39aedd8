// `npm run seed:bench`: a large invented data set for benchmarks, in its own database `lugline_bench` of the app's
// cluster so the demo data and the tests never see it. DATABASE_URL, when set, names the database to fill instead.
// `npm run seed:bench -- --fresh` drops and recreates `lugline_bench` first.
import { clusters, databaseUrl } from './config.mjs';
import { ensureDatabase, ensureDependencies, fail, knex, log, startCluster } from './setup.mjs';

const BENCH_DATABASE = 'lugline_bench';
const fresh = process.argv.includes('--fresh');
const started = performance.now();

ensureDependencies();
let url = process.env.DATABASE_URL;
if (url) {
	// Dropping a database someone named by hand is not ours to do.
	if (fresh) fail('--fresh only rebuilds the local lugline_bench database; unset DATABASE_URL to use it.');
} else {
	await startCluster(clusters.app);
	await ensureDatabase(clusters.app, BENCH_DATABASE, { fresh });
	url = databaseUrl(clusters.app, BENCH_DATABASE);
}
log(`benchmark data into ${url.replace(/\/\/[^@/]*@/, '//')}`);
knex(['migrate:latest'], url);
knex(['seed:run'], url, { LUGLINE_SEEDS: './seeds/bench' });
log(`seed:bench took ${((performance.now() - started) / 1000).toFixed(1)} s`);

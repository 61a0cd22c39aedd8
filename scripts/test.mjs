// `npm test`: the same set-up as `npm start` against the tests' own cluster and a fresh database,
// then svelte-check, Vitest (unit + integration on the real PostgreSQL) and Playwright (Debian's Chromium). Photos go
// to the tests' own S3 fake (.data/s3-test, port 54359) and customer e-mail to the tests' own mail catcher
// (.data/mail-test, port 54379), both started empty before Vitest and stopped at the end.
// Then the reliability suite (tests/reliability: a database restart under load, hostile input, brute force, a
// thousand streams, concurrent starts…), which `npm run test:reliability` runs alone.
// Every suite runs even when an earlier one fails; the last line is `N passed, N failed` over all of them, after
// each suite's own count and time.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import {
	bodySizeLimit,
	catcherSmtpEnv,
	clusters,
	dataDir,
	databaseUrl,
	fakeS3Env,
	mailCatchers,
	root,
	s3Fakes
} from './config.mjs';
import {
	ensureBuild,
	ensureChromium,
	ensureDatabase,
	ensureDependencies,
	knex,
	log,
	startCluster,
	startMailCatcher,
	startS3Fake,
	stopLocalService
} from './setup.mjs';

const cluster = clusters.test;
const testDatabaseUrl = databaseUrl(cluster);
const resultsDir = join(dataDir, 'test-results');
// e.g. `npm test -- vitest` runs one suite (check, vitest, e2e, reliability); a file name after it narrows Vitest's
// suites to that file: `npm run test:reliability -- restart`.
const args = process.argv.slice(2);
const suites = ['check', 'vitest', 'e2e', 'reliability'];
const only = args.filter((a) => suites.includes(a));
const files = args.filter((a) => !suites.includes(a));

ensureDependencies();
ensureChromium();
await startCluster(cluster);
await ensureDatabase(cluster, cluster.database, { fresh: true });
knex(['migrate:latest'], testDatabaseUrl);
knex(['seed:run'], testDatabaseUrl);
rmSync(resultsDir, { recursive: true, force: true });
mkdirSync(resultsDir, { recursive: true });

const env = {
	...process.env,
	DATABASE_URL: testDatabaseUrl,
	LUGLINE_TEST_PG_PORT: String(cluster.port),
	AUTH_SECRET: process.env.AUTH_SECRET ?? 'lugline-test-secret-not-for-production-000000',
	NODE_ENV: 'test',
	// Always the tests' fake, even when S3_ENDPOINT names real storage: the tests count the bucket's objects.
	...fakeS3Env(s3Fakes.test),
	// Always the tests' catcher, even when SMTP_HOST names a real mail service: tests must never mail anyone.
	...catcherSmtpEnv(mailCatchers.test),
	BODY_SIZE_LIMIT: bodySizeLimit,
	AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true'
};
const tally = [];

let lastStepSeconds = 0;
function step(name, command, args, extraEnv = {}) {
	log(`── ${name} ──`);
	const started = Date.now();
	const result = spawnSync(command, args, { stdio: 'inherit', cwd: root, env: { ...env, ...extraEnv } });
	lastStepSeconds = (Date.now() - started) / 1000;
	return result.status ?? 1;
}

function readJson(file) {
	try {
		return JSON.parse(readFileSync(file, 'utf8'));
	} catch {
		return null;
	}
}

const node = process.execPath;
const bin = (pkg, file) => join('node_modules', pkg, file);
const wants = (suite) => only.length === 0 || only.includes(suite);

if (wants('check')) {
	step('svelte-kit sync', node, [bin('@sveltejs/kit', 'svelte-kit.js'), 'sync']);
	const status = step('svelte-check', node, [
		bin('svelte-check', 'bin/svelte-check'),
		'--tsconfig',
		'./tsconfig.json',
		'--fail-on-warnings'
	]);
	tally.push({
		suite: 'svelte-check',
		passed: status === 0 ? 1 : 0,
		failed: status === 0 ? 0 : 1,
		seconds: lastStepSeconds
	});
}

// The integration tests start app instances from the build, so build before Vitest.
const needsApp = wants('vitest') || wants('e2e') || wants('reliability');
if (needsApp) ensureBuild();
const s3Fake = needsApp ? await startS3Fake(s3Fakes.test) : null;
const mailCatcher = needsApp ? await startMailCatcher(mailCatchers.test) : null;

function vitest(suite, extraEnv = {}) {
	const out = join(resultsDir, `${suite}.json`);
	const status = step(
		suite,
		node,
		[bin('vitest', 'vitest.mjs'), 'run', ...files, '--reporter=default', '--reporter=json', `--outputFile.json=${out}`],
		extraEnv
	);
	const report = readJson(out);
	const passed = report?.numPassedTests ?? 0;
	const failed = (report?.numFailedTests ?? 0) + (status !== 0 && !report?.numFailedTests ? 1 : 0);
	tally.push({ suite, passed, failed, seconds: lastStepSeconds });
}

if (wants('vitest')) vitest('vitest');

if (wants('e2e')) {
	const out = join(resultsDir, 'playwright.json');
	const status = step('playwright', node, [bin('@playwright/test', 'cli.js'), 'test', '--reporter=list,json'], {
		PLAYWRIGHT_JSON_OUTPUT_NAME: out
	});
	const stats = readJson(out)?.stats;
	const passed = (stats?.expected ?? 0) + (stats?.flaky ?? 0);
	const failed = (stats?.unexpected ?? 0) + (status !== 0 && !stats?.unexpected ? 1 : 0);
	tally.push({ suite: 'playwright', passed, failed, seconds: lastStepSeconds });
}

// Last: one of its tests restarts the tests' database cluster.
if (wants('reliability')) vitest('reliability', { LUGLINE_SUITE: 'reliability' });

await stopLocalService(s3Fake);
await stopLocalService(mailCatcher);

const passed = tally.reduce((n, t) => n + t.passed, 0);
const failed = tally.reduce((n, t) => n + t.failed, 0);
console.log('');
for (const t of tally)
	console.log(`  ${t.suite.padEnd(13)} ${t.passed} passed, ${t.failed} failed  (${t.seconds.toFixed(0)} s)`);
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed > 0 || passed === 0 ? 1 : 0);

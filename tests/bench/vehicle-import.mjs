// How long a manager waits for a 20,000-row vehicle data import, measured end to end through the built app: the
// upload, papaparse, the row checks, the plan against the stored data and the batched upsert in one transaction.
//   node tests/bench/vehicle-import.mjs            (needs a build: `npx vite build`)
//
// 1. Creates a scratch database (`lugline_vehicle_import_bench`, dropped at the end; `--keep` keeps it) in the tests'
//    cluster (127.0.0.1:54339; BENCH_PG_URL names another server's `postgres` database), migrates it and adds one
//    invented store with one manager.
// 2. Starts `node build` on 127.0.0.1:3232 (BENCH_PORT) against it and signs the manager in through the real form.
// 3. Generates 20,000 invented rows (BENCH_ROWS) and times, as the page posts them:
//      preview of the new file → import it (20,000 added) → preview and import it again (all unchanged)
//      → import a file with every row changed (20,000 updates).
// Prints each figure in ms; exits non-zero when an answer is not what the file should give.
import { spawn, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { hash } from '@node-rs/argon2';
import * as devalue from 'devalue';
import pg from 'pg';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const adminUrl = process.env.BENCH_PG_URL ?? 'postgres://postgres@127.0.0.1:54339/postgres';
const dbName = 'lugline_vehicle_import_bench';
const port = Number(process.env.BENCH_PORT ?? 3232);
const rowCount = Number(process.env.BENCH_ROWS ?? 20_000);
const keep = process.argv.includes('--keep');
const url = `http://127.0.0.1:${port}`;
const log = (m) => console.log(`[vehicle-import] ${m}`);

const databaseUrl = (() => {
	const u = new URL(adminUrl);
	u.pathname = `/${dbName}`;
	return u.toString();
})();

async function sql(connectionString, text, params) {
	const client = new pg.Client({ connectionString });
	await client.connect();
	try {
		return await client.query(text, params);
	} finally {
		await client.end();
	}
}

// The documented column format, as the README's example file states it (this script cannot import TypeScript).
const columns = readFileSync(join(root, 'static', 'vehicle-data-example.csv'), 'utf8')
	.split(/\r?\n/)[0]
	.replace(/^\uFEFF/, '')
	.split(',');

/** Invented rows: coined make names, wheel facts in the trade's ranges, describing no real vehicle. */
function generate(count, torqueOffset = 0) {
	const makes = ['Quorvel', 'Tansmere', 'Ulbrecht', 'Vossaly', 'Wrenholt'];
	const lines = [columns.join(',')];
	for (let i = 0; i < count; i++) {
		lines.push(
			[
				makes[i % makes.length],
				`Bench ${String(Math.floor(i / makes.length)).padStart(5, '0')}`,
				['', 'GL', 'Sport', 'Van'][i % 4],
				2000 + (i % 20),
				2004 + (i % 20),
				4 + (i % 3),
				['100', '108', '114.3'][i % 3],
				['56.1', '63.4', '64.1'][i % 3],
				['M12x1.5', 'M14x1.5', '1/2-20'][i % 3],
				['17', '19', '21'][i % 3],
				80 + (i % 60) + torqueOffset,
				'215/55R17 94V',
				i % 7 === 0 ? '235/50R17 96V' : '215/55R17 94V',
				220 + (i % 5) * 10,
				220,
				['direct', 'indirect', 'none'][i % 3],
				i % 11 === 0 ? '"Invented note, with a comma"' : '',
				'Invented benchmark data - not for service use'
			].join(',')
		);
	}
	return new TextEncoder().encode(lines.join('\r\n') + '\r\n');
}

async function action(cookie, name, bytes, token) {
	const form = new FormData();
	form.set('file', new Blob([bytes], { type: 'text/csv' }), 'bench.csv');
	if (token !== undefined) form.set('token', token);
	const started = performance.now();
	const response = await fetch(`${url}/manage/vehicles/import?/${name}`, {
		method: 'POST',
		headers: { origin: url, cookie, accept: 'application/json', 'x-sveltekit-action': 'true' },
		body: form
	});
	const body = await response.json();
	const ms = Math.round(performance.now() - started);
	return { ms, type: body.type, data: body.data ? devalue.parse(body.data) : undefined };
}

function expectCounts(what, got, want) {
	for (const [k, v] of Object.entries(want)) {
		if (got?.[k] !== v) throw new Error(`${what}: ${k} is ${got?.[k]}, expected ${v} (${JSON.stringify(got)})`);
	}
}

async function waitHealthy(deadline) {
	while (Date.now() < deadline) {
		try {
			if ((await fetch(`${url}/api/health`)).status === 200) return;
		} catch {
			// not listening yet
		}
		await new Promise((r) => setTimeout(r, 100));
	}
	throw new Error(`${url} did not become healthy`);
}

let app;
let failed = false;
try {
	log(`scratch database ${dbName} on ${new URL(adminUrl).host}`);
	await sql(adminUrl, `DROP DATABASE IF EXISTS "${dbName}" WITH (FORCE)`);
	await sql(adminUrl, `CREATE DATABASE "${dbName}"`);
	const migrate = spawnSync(
		process.execPath,
		['--import', 'tsx', join('node_modules', 'knex', 'bin', 'cli.js'), 'migrate:latest', '--knexfile', 'knexfile.ts'],
		{ cwd: root, encoding: 'utf8', env: { ...process.env, DATABASE_URL: databaseUrl } }
	);
	if (migrate.status !== 0) throw new Error(`migrations failed:\n${migrate.stdout}\n${migrate.stderr}`);
	const password = 'bench-manager-1';
	const { rows } = await sql(
		databaseUrl,
		`INSERT INTO stores (slug, name, timezone) VALUES ('bench-import', 'Invented bench store', 'UTC') RETURNING id`
	);
	await sql(
		databaseUrl,
		`INSERT INTO users (store_id, name, email, role, password_hash) VALUES ($1, 'Invented manager', 'manager@bench-import.lugline.test', 'manager', $2)`,
		[rows[0].id, await hash(password)]
	);

	app = spawn(process.execPath, ['build'], {
		cwd: root,
		env: {
			...process.env,
			HOST: '127.0.0.1',
			PORT: String(port),
			ORIGIN: url,
			AUTH_SECRET: 'lugline-bench-secret-not-for-production',
			DATABASE_URL: databaseUrl,
			BODY_SIZE_LIMIT: String(10 * 1024 * 1024 + 64 * 1024),
			AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true'
		},
		stdio: ['ignore', 'ignore', 'inherit']
	});
	await waitHealthy(Date.now() + 30_000);
	const signin = await fetch(`${url}/signin`, {
		method: 'POST',
		headers: { origin: url, accept: 'text/html', 'content-type': 'application/x-www-form-urlencoded' },
		body: new URLSearchParams({ email: 'manager@bench-import.lugline.test', password }),
		redirect: 'manual'
	});
	const cookie = signin.headers
		.getSetCookie()
		.map((c) => c.split(';')[0])
		.find((c) => c.startsWith('authjs.session-token='));
	if (!cookie) throw new Error(`sign-in failed: ${signin.status}`);

	const file = generate(rowCount);
	log(`${rowCount.toLocaleString()} invented rows, ${(file.length / 1024 / 1024).toFixed(1)} MB`);
	const figures = [];

	const first = await action(cookie, 'preview', file);
	expectCounts('preview', first.data?.preview, { added: rowCount, issueCount: 0 });
	figures.push(['preview (parse + check + plan)', first.ms]);

	const imported = await action(cookie, 'import', file, first.data.preview.token);
	expectCounts('import', imported.data?.imported, { added: rowCount, changed: 0 });
	figures.push([`import: ${rowCount.toLocaleString()} added`, imported.ms]);

	const again = await action(cookie, 'preview', file);
	expectCounts('preview again', again.data?.preview, { unchanged: rowCount, added: 0, changed: 0 });
	figures.push(['preview of the same file (all unchanged)', again.ms]);
	const sha = createHash('sha256').update(file).digest('hex');
	const same = await action(cookie, 'import', file, `${sha}.0.0.${rowCount}`);
	expectCounts('import again', same.data?.imported, { unchanged: rowCount, added: 0, changed: 0 });
	figures.push(['import of the same file (nothing written)', same.ms]);

	const changedFile = generate(rowCount, 1);
	const changedPreview = await action(cookie, 'preview', changedFile);
	expectCounts('preview of changes', changedPreview.data?.preview, { changed: rowCount });
	const changed = await action(cookie, 'import', changedFile, changedPreview.data.preview.token);
	expectCounts('import of changes', changed.data?.imported, { changed: rowCount });
	figures.push([`import: ${rowCount.toLocaleString()} changed`, changed.ms]);

	const versions = await sql(databaseUrl, 'SELECT version, count(*)::int AS n FROM vehicles GROUP BY version');
	expectCounts('versions', Object.fromEntries(versions.rows.map((r) => [r.version, r.n])), { 2: rowCount });

	for (const [what, ms] of figures) console.log(`${what.padEnd(44)} ${String(ms).padStart(6)} ms`);
} catch (error) {
	failed = true;
	console.error(`[vehicle-import] ${error instanceof Error ? error.stack : error}`);
} finally {
	if (app && app.exitCode === null) {
		const exited = new Promise((r) => app.once('exit', r));
		app.kill('SIGTERM');
		await exited;
	}
	if (!keep) await sql(adminUrl, `DROP DATABASE IF EXISTS "${dbName}" WITH (FORCE)`).catch(() => {});
}
process.exit(failed ? 1 : 0);

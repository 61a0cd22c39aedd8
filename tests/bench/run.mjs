// Runs every bench in this folder against two fresh app instances on the bench database, then stops them:
//   node tests/bench/run.mjs            (suggested npm script: "bench": "node tests/bench/run.mjs")
//
// 1. `node scripts/seed-bench.mjs`: starts the app's private cluster (port 54329) if needed and creates, migrates and
//    seeds `lugline_bench` (idempotent; a second run only checks).
// 2. Needs an existing build (`build/index.js`); it does not build, so the figures are for the build you have.
// 3. Starts `node build` twice, on 127.0.0.1:3401 (A) and :3402 (B), with a fixed AUTH_SECRET shared by both.
// 4. Runs wheel-moves.mjs, board.mjs and live-fanout.mjs in turn (each as its own process, so one bench's client
//    state never colours the next; the instances are restarted before live-fanout.mjs for its memory figure),
//    printing all their figures; then stops the instances.
// Exits non-zero when a bench failed to run or saw errors (409s, refused requests, undelivered events); a missed
// speed target is reported in the figures, not as a failure.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { pidListeningOn, waitHealthy } from './lib.mjs';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const ports = { A: 3401, B: 3402 };
const databaseUrl = 'postgres://postgres@127.0.0.1:54329/lugline_bench';
// Any fixed string: both instances must share it so a session from one is valid on the other.
const authSecret = 'lugline-bench-secret-not-for-production';
const benches = ['wheel-moves.mjs', 'board.mjs', 'live-fanout.mjs'];
const benchTimeoutMs = 5 * 60_000;

const log = (m) => console.log(`[bench] ${m}`);

if (!existsSync(join(root, 'build', 'index.js'))) {
	console.error('[bench] There is no build (build/index.js). Run `npm run build` first, then run this again.');
	process.exit(1);
}
for (const port of Object.values(ports)) {
	if (pidListeningOn(port)) {
		console.error(
			`[bench] Port ${port} is already in use; stop whatever listens there (or run the benches alone with BENCH_URL_A/B).`
		);
		process.exit(1);
	}
}

function withoutDatabaseUrl() {
	const env = { ...process.env };
	delete env.DATABASE_URL;
	return env;
}

log('bench database: node scripts/seed-bench.mjs');
const seeded = spawnSync(process.execPath, ['scripts/seed-bench.mjs'], {
	cwd: root,
	stdio: 'inherit',
	// The seed script fills the database DATABASE_URL names when it is set; it must be lugline_bench here.
	env: withoutDatabaseUrl()
});
if (seeded.status !== 0) process.exit(seeded.status ?? 1);

function startInstance(name, port) {
	const url = `http://127.0.0.1:${port}`;
	const child = spawn(process.execPath, ['build'], {
		cwd: root,
		env: {
			...process.env,
			HOST: '127.0.0.1',
			PORT: String(port),
			ORIGIN: url,
			AUTH_SECRET: authSecret,
			DATABASE_URL: databaseUrl,
			// As `npm start` runs the app (scripts/config.mjs): a 10 MiB photo plus the multipart framing. The benches
			// upload no photos, so the S3_* settings are whatever the environment says (default: the local fake).
			BODY_SIZE_LIMIT: process.env.BODY_SIZE_LIMIT ?? String(10 * 1024 * 1024 + 64 * 1024),
			AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true'
		},
		stdio: ['ignore', 'ignore', 'pipe']
	});
	child.stderr.on('data', (d) => process.stderr.write(`[instance ${name}] ${d}`));
	return { name, port, url, child };
}
let instances = [];
async function startInstances() {
	instances = Object.entries(ports).map(([name, port]) => startInstance(name, port));
	await Promise.all(instances.map((i) => waitHealthy(i.url)));
	log(
		`instances up: A ${instances[0].url} (pid ${instances[0].child.pid}), B ${instances[1].url} (pid ${instances[1].child.pid})`
	);
}

async function stopInstances() {
	await Promise.all(
		instances.map(
			(i) =>
				new Promise((done) => {
					if (i.child.exitCode !== null || i.child.signalCode !== null) return done();
					i.child.once('exit', done);
					i.child.kill('SIGTERM');
					setTimeout(() => i.child.kill('SIGKILL'), 5000).unref();
				})
		)
	);
}
for (const signal of ['SIGINT', 'SIGTERM']) {
	process.on(signal, () => void stopInstances().then(() => process.exit(130)));
}

const env = () => ({
	...process.env,
	BENCH_URL_A: instances[0].url,
	BENCH_URL_B: instances[1].url,
	BENCH_PID_A: String(instances[0].child.pid),
	BENCH_PID_B: String(instances[1].child.pid)
});

let failed = 0;
try {
	await startInstances();
	for (const bench of benches) {
		if (bench === 'live-fanout.mjs') {
			// Fresh instances, so the per-screen memory is not hidden in heap the board bench grew and left behind.
			await stopInstances();
			await startInstances();
		}
		log(`running ${bench}`);
		const started = performance.now();
		const code = await new Promise((done) => {
			const child = spawn(process.execPath, [join('tests', 'bench', bench)], {
				cwd: root,
				env: env(),
				stdio: 'inherit'
			});
			const timer = setTimeout(() => child.kill('SIGKILL'), benchTimeoutMs);
			child.on('exit', (c, signal) => {
				clearTimeout(timer);
				done(signal ? 1 : (c ?? 1));
			});
		});
		log(
			`${bench} ${code === 0 ? 'done' : `exited with ${code}`} in ${((performance.now() - started) / 1000).toFixed(1)} s`
		);
		if (code !== 0) failed++;
		for (const i of instances)
			if (i.child.exitCode !== null) throw new Error(`instance ${i.name} exited (${i.child.exitCode})`);
	}
} catch (error) {
	console.error(`[bench] ${error instanceof Error ? error.message : error}`);
	failed++;
} finally {
	await stopInstances();
	log('instances stopped');
}
process.exit(failed ? 1 : 0);

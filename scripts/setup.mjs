// Set-up steps shared by `npm start`, `npm test`, `npm run dev` and `npm run db:*`.
// Plain Node.js with no dependencies: this file runs before `npm ci` has installed anything.
import { spawnSync, spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { connect } from 'node:net';
import { dirname, join } from 'node:path';
import { root, databaseUrl } from './config.mjs';

const isRoot = process.getuid?.() === 0;

export function log(message) {
	console.log(`\x1b[2m[lugline]\x1b[0m ${message}`);
}

export function fail(message) {
	console.error(`\n[lugline] ${message}\n`);
	process.exit(1);
}

/** Runs a command to completion with inherited output; exits the script when it fails. */
export function run(command, args, options = {}) {
	const result = spawnSync(command, args, { stdio: 'inherit', cwd: root, ...options });
	if (result.error) fail(`${command} could not start: ${result.error.message}`);
	if (result.status !== 0 && !options.allowFailure) fail(`${command} ${args.join(' ')} exited with ${result.status}`);
	return result;
}

function capture(command, args, options = {}) {
	const result = spawnSync(command, args, { encoding: 'utf8', cwd: root, ...options });
	return { status: result.status ?? 1, out: `${result.stdout ?? ''}${result.stderr ?? ''}`.trim() };
}

// ---------------------------------------------------------------- npm dependencies

/** `npm ci` when node_modules is missing or was installed from another package-lock.json. */
export function ensureDependencies() {
	const lock = join(root, 'package-lock.json');
	const stamp = join(root, 'node_modules', '.lugline-lock-hash');
	const hash = createHash('sha256').update(readFileSync(lock)).digest('hex');
	if (existsSync(stamp) && readFileSync(stamp, 'utf8') === hash) return;
	log('installing npm dependencies (npm ci)…');
	run('npm', ['ci', '--no-audit', '--no-fund']);
	writeFileSync(stamp, hash);
}

// ---------------------------------------------------------------- Debian packages

let aptUpdated = false;
function aptInstall(packages) {
	if (!isRoot) fail(`${packages.join(' ')} is missing. Install it with: sudo apt-get install -y ${packages.join(' ')}`);
	if (!aptUpdated) {
		run('apt-get', ['update', '-q']);
		aptUpdated = true;
	}
	run('apt-get', ['install', '-y', '-q', '--no-install-recommends', ...packages], {
		env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
	});
}

/** The folder of the newest PostgreSQL server binaries from Debian's packages, installing them when missing. */
export function postgresBin() {
	const find = () => {
		const base = '/usr/lib/postgresql';
		if (!existsSync(base)) return null;
		const versions = readdirSync(base)
			.filter((v) => existsSync(join(base, v, 'bin', 'pg_ctl')) && existsSync(join(base, v, 'bin', 'initdb')))
			.sort((a, b) => Number(b) - Number(a));
		return versions.length ? join(base, versions[0], 'bin') : null;
	};
	let bin = find();
	if (!bin) {
		log('installing PostgreSQL from Debian packages…');
		// Debian's package would otherwise create and start its own cluster on 5432; we only need the binaries.
		if (isRoot) {
			mkdirSync('/etc/postgresql-common', { recursive: true });
			const conf = '/etc/postgresql-common/createcluster.conf';
			const current = existsSync(conf) ? readFileSync(conf, 'utf8') : '';
			if (!/^\s*create_main_cluster\s*=\s*false/m.test(current)) {
				writeFileSync(conf, `${current}${current && !current.endsWith('\n') ? '\n' : ''}create_main_cluster = false\n`);
			}
		}
		aptInstall(['postgresql', 'postgresql-contrib']);
		bin = find();
		if (!bin) fail('PostgreSQL was installed but its server binaries were not found under /usr/lib/postgresql');
	}
	return bin;
}

export function ensureChromium() {
	if (existsSync('/usr/bin/chromium')) return '/usr/bin/chromium';
	log('installing Chromium from Debian packages (a few minutes the first time)…');
	aptInstall(['chromium']);
	return '/usr/bin/chromium';
}

// ---------------------------------------------------------------- the private cluster

/** Runs a PostgreSQL binary as the postgres user when we are root: the server refuses to run as root. */
function asPostgres(command, args, options = {}) {
	if (isRoot) return capture('runuser', ['-u', 'postgres', '--', command, ...args], options);
	return capture(command, args, options);
}

function portAnswers(port) {
	return new Promise((done) => {
		const socket = connect({ host: '127.0.0.1', port });
		socket.once('connect', () => (socket.destroy(), done(true)));
		socket.once('error', () => done(false));
		socket.setTimeout(1000, () => (socket.destroy(), done(false)));
	});
}

function clusterPaths(cluster) {
	return { data: join(cluster.dir, 'data'), run: join(cluster.dir, 'run'), logFile: join(cluster.dir, 'server.log') };
}

export function clusterRunning(cluster) {
	const bin = postgresBin();
	const { data } = clusterPaths(cluster);
	if (!existsSync(join(data, 'PG_VERSION'))) return false;
	return asPostgres(join(bin, 'pg_ctl'), ['status', '-D', data]).status === 0;
}

/** Creates the cluster on first use and starts it on 127.0.0.1:<port>; reuses a running one. */
export async function startCluster(cluster) {
	const bin = postgresBin();
	const { data, run: socketDir, logFile } = clusterPaths(cluster);
	mkdirSync(socketDir, { recursive: true });
	if (isRoot) {
		run('chown', ['-R', 'postgres:postgres', cluster.dir]);
		// The postgres user must be able to reach the folder through its parents.
		const probe = capture('runuser', ['-u', 'postgres', '--', 'test', '-w', cluster.dir]);
		if (probe.status !== 0) {
			fail(
				`The postgres user cannot write to ${cluster.dir}. Give it access to the folders above it ` +
					`(chmod o+x on each) or set LUGLINE_DATA_DIR to a folder it can reach.`
			);
		}
	}
	if (!existsSync(join(data, 'PG_VERSION'))) {
		log(`creating the ${cluster.name} database cluster in ${data}`);
		const init = asPostgres(join(bin, 'initdb'), [
			'-D',
			data,
			'-U',
			'postgres',
			'--auth=trust',
			'-E',
			'UTF8',
			'--locale=C.UTF-8'
		]);
		if (init.status !== 0) fail(`initdb failed:\n${init.out}`);
	}
	if (clusterRunning(cluster)) {
		const pid = readFileSync(join(data, 'postmaster.pid'), 'utf8').split('\n');
		if (Number(pid[3]) !== cluster.port) {
			fail(
				`The ${cluster.name} cluster is already running on port ${pid[3]}, not ${cluster.port}. Stop it with npm run db:stop.`
			);
		}
		return;
	}
	if (await portAnswers(cluster.port)) {
		fail(
			`Port ${cluster.port} is already taken by another program. Choose a free one with ` +
				`${cluster.name === 'test' ? 'LUGLINE_TEST_PG_PORT' : 'LUGLINE_PG_PORT'}=<port>.`
		);
	}
	log(`starting the ${cluster.name} PostgreSQL cluster on 127.0.0.1:${cluster.port}`);
	const options = `-p ${cluster.port} -k ${socketDir} -c listen_addresses=127.0.0.1`;
	const started = asPostgres(join(bin, 'pg_ctl'), [
		'-D',
		data,
		'-o',
		options,
		'-l',
		logFile,
		'-w',
		'-t',
		'60',
		'start'
	]);
	if (started.status !== 0) fail(`PostgreSQL did not start:\n${started.out}\nSee ${logFile}`);
}

export function stopCluster(cluster) {
	const bin = postgresBin();
	const { data } = clusterPaths(cluster);
	if (!clusterRunning(cluster)) return false;
	const stopped = asPostgres(join(bin, 'pg_ctl'), ['-D', data, '-m', 'fast', '-w', 'stop']);
	if (stopped.status !== 0) fail(`PostgreSQL did not stop:\n${stopped.out}`);
	return true;
}

/** `pg_ctl restart` (fast mode: open connections are cut), with the options the cluster was started with. */
export function restartCluster(cluster) {
	const bin = postgresBin();
	const { data, logFile } = clusterPaths(cluster);
	if (!clusterRunning(cluster)) fail(`The ${cluster.name} cluster is not running.`);
	const restarted = asPostgres(join(bin, 'pg_ctl'), [
		'-D',
		data,
		'-m',
		'fast',
		'-l',
		logFile,
		'-w',
		'-t',
		'60',
		'restart'
	]);
	if (restarted.status !== 0) fail(`PostgreSQL did not restart:\n${restarted.out}\nSee ${logFile}`);
}

/** Creates the database when missing (or anew when `fresh`), using pg once the npm dependencies are in. */
export async function ensureDatabase(cluster, database, { fresh = false } = {}) {
	const { default: pg } = await import('pg');
	const client = new pg.Client({ connectionString: databaseUrl(cluster, 'postgres') });
	await client.connect();
	try {
		const quoted = `"${database.replaceAll('"', '""')}"`;
		if (fresh) await client.query(`DROP DATABASE IF EXISTS ${quoted} WITH (FORCE)`);
		const { rowCount } = await client.query('SELECT 1 FROM pg_database WHERE datname = $1', [database]);
		if (!rowCount) {
			log(`creating database ${database}`);
			await client.query(`CREATE DATABASE ${quoted}`);
		}
	} finally {
		await client.end();
	}
}

/** Runs a Knex CLI command (TypeScript knexfile through tsx) against one database. */
export function knex(args, databaseUrlValue, env = {}) {
	run(
		process.execPath,
		['--import', 'tsx', join('node_modules', 'knex', 'bin', 'cli.js'), ...args, '--knexfile', 'knexfile.ts'],
		{
			env: { ...process.env, DATABASE_URL: databaseUrlValue, ...env }
		}
	);
}

// ---------------------------------------------------------------- the build

function newestChange(path) {
	const info = statSync(path);
	if (!info.isDirectory()) return info.mtimeMs;
	let newest = info.mtimeMs;
	for (const entry of readdirSync(path)) newest = Math.max(newest, newestChange(join(path, entry)));
	return newest;
}

/** `vite build` when the build is missing or older than the sources it is made from. */
export function ensureBuild({ force = false } = {}) {
	const stamp = join(root, 'build', '.lugline-built');
	const inputs = ['src', 'static', 'svelte.config.js', 'vite.config.ts', 'package-lock.json'].map((p) => join(root, p));
	const newest = Math.max(...inputs.filter(existsSync).map(newestChange));
	if (!force && existsSync(stamp) && statSync(stamp).mtimeMs >= newest) return;
	log('building the app (vite build)…');
	run(process.execPath, [join('node_modules', 'vite', 'bin', 'vite.js'), 'build']);
	mkdirSync(dirname(stamp), { recursive: true });
	writeFileSync(stamp, new Date().toISOString());
}

// ---------------------------------------------------------------- the local S3 fake and SMTP catcher

/**
 * Starts one of our local stand-ins for a service (scripts/s3-fake.mjs, scripts/mail-catcher.mjs) as a child process
 * and resolves once it prints its ready line; exits the script with the child's own message when it cannot start (a
 * taken port, say). The child stops when this process exits, however it exits.
 */
function startLocalService({ what, script, config, ready, stoppedNote }) {
	log(`starting the ${config.name} ${what} on 127.0.0.1:${config.port} (${config.dir})`);
	const args = [join('scripts', script), ...(config.name === 'test' ? ['--test'] : [])];
	// The IPC channel is only there so the child notices when this process dies without a signal.
	const child = spawn(process.execPath, args, { cwd: root, stdio: ['ignore', 'pipe', 'pipe', 'ipc'] });
	process.on('exit', () => child.kill('SIGTERM'));
	return new Promise((resolve) => {
		let started = false;
		let out = '';
		let errors = '';
		child.stderr.on('data', (d) => {
			if (started) process.stderr.write(`[${script.replace(/\.mjs$/, '')}] ${d}`);
			else errors += d;
		});
		child.stdout.on('data', (d) => {
			// Once ready the catcher prints a line per message; the outbox page shows the same, so stay quiet.
			if (started) return;
			out += d;
			if (out.includes(ready)) {
				started = true;
				log(out.trim());
				resolve(child);
			}
		});
		child.once('exit', (code, signal) => {
			if (!started) fail(errors.trim() || `the ${what} exited with ${code} before it was ready`);
			else if (!signal && code !== 0) log(`the ${config.name} ${what} stopped (exit ${code}); ${stoppedNote}`);
		});
	});
}

/** The photo store's local fake (`fake` from config.mjs s3Fakes). */
export function startS3Fake(fake) {
	return startLocalService({
		what: 'S3 fake',
		script: 's3-fake.mjs',
		config: fake,
		ready: 's3 fake ready',
		stoppedNote: 'photos cannot be stored'
	});
}

/** The mail catcher (`catcher` from config.mjs mailCatchers). */
export function startMailCatcher(catcher) {
	return startLocalService({
		what: 'mail catcher',
		script: 'mail-catcher.mjs',
		config: catcher,
		ready: 'mail catcher ready',
		stoppedNote: 'notices wait in the outbox'
	});
}

/** Stops a child started by startS3Fake or startMailCatcher and waits until it has let go of its port. */
export function stopLocalService(child) {
	return new Promise((done) => {
		if (!child || child.exitCode !== null || child.signalCode !== null) return done();
		child.once('exit', () => done());
		child.kill('SIGTERM');
		setTimeout(() => child.kill('SIGKILL'), 5000).unref();
	});
}

/** Starts a long-running child and forwards Ctrl+C to it. */
export function serve(command, args, env) {
	const child = spawn(command, args, { stdio: 'inherit', cwd: root, env: { ...process.env, ...env } });
	const stop = () => child.kill('SIGTERM');
	process.on('SIGINT', stop);
	process.on('SIGTERM', stop);
	child.on('exit', (code, signal) => process.exit(signal ? 0 : (code ?? 0)));
	return child;
}

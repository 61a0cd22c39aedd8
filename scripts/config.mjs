// The one place where the local run's defaults live. Every script, the knexfile and the app read
// their settings from the environment; these are the values used when a variable is not set.
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
export const dataDir = process.env.LUGLINE_DATA_DIR ? resolve(process.env.LUGLINE_DATA_DIR) : join(root, '.data');

/** The private PostgreSQL clusters: one for the app and `npm run dev`, one that only the tests use. */
export const clusters = {
	app: {
		name: 'app',
		dir: join(dataDir, 'pg'),
		port: Number(process.env.LUGLINE_PG_PORT ?? 54329),
		database: process.env.LUGLINE_PG_DATABASE ?? 'lugline'
	},
	test: {
		name: 'test',
		dir: join(dataDir, 'pg-test'),
		port: Number(process.env.LUGLINE_TEST_PG_PORT ?? 54339),
		database: 'lugline_test'
	}
};

export function databaseUrl(cluster, database = cluster.database) {
	return `postgres://postgres@127.0.0.1:${cluster.port}/${database}`;
}

/** Where the app finds its database: DATABASE_URL when set (production), else the local cluster. */
export function appDatabaseUrl() {
	return process.env.DATABASE_URL ?? databaseUrl(clusters.app);
}

/**
 * AUTH_SECRET signs the session cookies. The local run keeps a generated one in the data folder so
 * sessions survive a restart; production sets its own.
 */
export function authSecret() {
	if (process.env.AUTH_SECRET) return process.env.AUTH_SECRET;
	const file = join(dataDir, 'auth-secret');
	if (!existsSync(file)) {
		mkdirSync(dirname(file), { recursive: true });
		writeFileSync(file, randomBytes(32).toString('base64url'), { mode: 0o600 });
	}
	return readFileSync(file, 'utf8').trim();
}

export const host = process.env.HOST ?? '127.0.0.1';
export const port = Number(process.env.PORT ?? 3000);
export const origin = process.env.ORIGIN ?? `http://${host}:${port}`;

// Migrations when an instance starts, before it serves: several instances may start at once against one database
// (a deploy, or a restart of every machine), so one PostgreSQL advisory lock lets exactly one of them migrate while
// the others wait and then find nothing to do. The lock is held by a connection of its own: if the migrating
// instance dies, the connection ends and the lock is released. Knex's own lock table alone is not enough on an
// empty database, where the first instances race to create it. `npm start` also migrates through the Knex CLI
// before starting; both read the same files in migrations/, compiled into the build here.
import type { Knex } from 'knex';
import pg from 'pg';
import { config } from '../config';
import { errorDetails, log } from '../log';
import { db, isDatabaseUnavailable } from './index';

type Migration = { up: (knex: Knex) => Promise<void>; down?: (knex: Knex) => Promise<void> };

const files = import.meta.glob<Migration>('/migrations/*.ts', { eager: true });

/** The files in migrations/ under the names the Knex CLI records (`20261126000100_x.ts`), in order. */
class BuiltMigrations implements Knex.MigrationSource<string> {
	async getMigrations() {
		return Object.keys(files).sort();
	}
	getMigrationName(path: string) {
		return path.slice(path.lastIndexOf('/') + 1);
	}
	async getMigration(path: string) {
		return files[path];
	}
}

/** 'Lugm': any fixed key shared by every instance. */
const MIGRATION_LOCK = 0x4c75676d;
const ATTEMPTS = 30;

export async function migrateOnStart(): Promise<void> {
	if (process.env.MIGRATE_ON_START === 'false') return;
	for (let attempt = 1; ; attempt++) {
		try {
			await migrateOnce();
			return;
		} catch (error) {
			// The database may still be starting (all machines rebooted at once): wait for it rather than exit.
			if (!isDatabaseUnavailable(error) || attempt >= ATTEMPTS) throw error;
			log.warn({ attempt, err: errorDetails(error) }, 'database not answering before migrating; retrying');
			await new Promise((r) => setTimeout(r, Math.min(250 * 2 ** attempt, 2000)));
		}
	}
}

async function migrateOnce(): Promise<void> {
	const lock = new pg.Client({
		connectionString: config().DATABASE_URL,
		connectionTimeoutMillis: config().DB_ACQUIRE_TIMEOUT_MS,
		application_name: 'lugline-migrate'
	});
	lock.on('error', () => {});
	await lock.connect();
	try {
		const waited = performance.now();
		await lock.query('SELECT pg_advisory_lock($1)', [MIGRATION_LOCK]);
		const started = performance.now();
		const [batch, applied] = (await db().migrate.latest({ migrationSource: new BuiltMigrations() })) as [
			number,
			string[]
		];
		const ms = Math.round(performance.now() - started);
		if (applied.length > 0)
			log.info({ batch, applied, ms, waitedMs: Math.round(started - waited) }, `migrations applied: ${applied.length}`);
		else log.info({ ms, waitedMs: Math.round(started - waited) }, 'migrations: already up to date');
		await lock.query('SELECT pg_advisory_unlock($1)', [MIGRATION_LOCK]);
	} finally {
		await lock.end().catch(() => {});
	}
}

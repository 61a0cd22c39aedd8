// The one Knex instance of this app instance. All SQL lives in the modules beside this file.
import knexFactory, { type Knex } from 'knex';
import pg from 'pg';
import { config } from '../config';

// NUMERIC columns arrive as strings by default; our numerics are measurements well inside a double's precision.
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (value) => Number(value));
// COUNT(*) and BIGSERIAL ids are int8; the values we keep stay far below 2^53.
pg.types.setTypeParser(pg.types.builtins.INT8, (value) => Number(value));

let instance: Knex | undefined;

export function db(): Knex {
	if (instance) return instance;
	const { DATABASE_URL, DB_POOL_MAX, DB_ACQUIRE_TIMEOUT_MS } = config();
	instance = knexFactory({
		client: 'pg',
		connection: {
			connectionString: DATABASE_URL,
			// A stopped or unreachable server must turn into a quick 503, not a hung request.
			connectionTimeoutMillis: DB_ACQUIRE_TIMEOUT_MS,
			statement_timeout: 15_000,
			application_name: 'lugline',
			// The floor's queries fetch a few hundred rows by key. With the default costs (tuned for spinning disks) the
			// planner scans all 100,000 customers in parallel instead, and the parallel workers take the core the app
			// needs. Index lookups on SSD-backed or cached data are nearly as cheap as sequential reads.
			options: '-c random_page_cost=1.1 -c max_parallel_workers_per_gather=0'
		},
		pool: {
			min: 0,
			max: DB_POOL_MAX,
			afterCreate(connection: pg.Client, done: (error: Error | null, connection: pg.Client) => void) {
				// An idle connection killed by a server restart emits 'error'; without a listener Node would crash.
				connection.on('error', () => {});
				done(null, connection);
			}
		},
		acquireConnectionTimeout: DB_ACQUIRE_TIMEOUT_MS
	});
	return instance;
}

const unavailableCodes = new Set([
	'ECONNREFUSED',
	'ECONNRESET',
	'ETIMEDOUT',
	'EPIPE',
	'57P01', // admin_shutdown
	'57P02', // crash_shutdown
	'57P03', // cannot_connect_now (starting up or shutting down)
	'08000',
	'08001',
	'08003',
	'08006'
]);

let lastUnavailableAt = -Infinity;

/**
 * True when an error means "the database cannot be reached right now" rather than a bug or bad input. Every such
 * answer is also noted (see `shouldShed`): the callers are exactly the places that turn it into a 503.
 */
export function isDatabaseUnavailable(error: unknown): boolean {
	if (unavailable(error)) {
		lastUnavailableAt = Date.now();
		return true;
	}
	return false;
}

function unavailable(error: unknown): boolean {
	for (
		let e = error as { code?: string; name?: string; message?: string; cause?: unknown } | undefined, depth = 0;
		e && depth < 5;
		e = e.cause as typeof e, depth++
	) {
		if (e.code && unavailableCodes.has(e.code)) return true;
		if (e.name === 'KnexTimeoutError') return true;
		if (
			typeof e.message === 'string' &&
			/Connection terminated|connection timeout|Timeout acquiring a connection|Connection ended|not queryable|Client was closed/i.test(
				e.message
			)
		)
			return true;
	}
	return false;
}

/**
 * Whether to refuse a new API request at once (hooks.server.ts answers 503 `busy`). After the database was away
 * (a restart), the requests made meanwhile form a queue for connections; if new ones keep joining it, each waits
 * until it times out and the instance stays overloaded long after the database is back. So while the database has
 * failed in the last 30 s and more requests wait for a connection than four times the pool's size, new requests
 * are shed and the queue drains. A burst in normal times (a thousand screens reconnecting) just queues.
 */
export function shouldShed(): boolean {
	if (Date.now() - lastUnavailableAt > 30_000) return false;
	const pool = instance?.client?.pool as { numPendingAcquires?: () => number } | undefined;
	return (pool?.numPendingAcquires?.() ?? 0) > config().DB_POOL_MAX * 4;
}

/**
 * PostgreSQL's own message of a failed statement. Knex puts the statement, bindings inlined, in front of it
 * (`SELECT … - message`): fine for the log, never for a client.
 */
export function databaseMessage(error: unknown): string {
	const message = String((error as { message?: unknown })?.message ?? '');
	const cut = message.indexOf(' - ');
	return cut >= 0 && /^\s*(select|insert|update|delete|with|call)\b/i.test(message) ? message.slice(cut + 3) : message;
}

/** Whether the database answers a trivial query within `timeoutMs`. */
export async function ping(timeoutMs = 2000): Promise<{ up: true; ms: number } | { up: false; reason: string }> {
	const started = performance.now();
	try {
		await db().raw('SELECT 1').timeout(timeoutMs, { cancel: false });
		return { up: true, ms: Math.round(performance.now() - started) };
	} catch (error) {
		return { up: false, reason: error instanceof Error ? error.message : String(error) };
	}
}

/** Closes the pool, so a stopping app does not wait for idle connections to time out. */
export async function close(): Promise<void> {
	const current = instance;
	instance = undefined;
	await current?.destroy();
}

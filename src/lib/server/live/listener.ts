// The one LISTEN connection of this app instance. A dedicated pg.Client (never a pooled one: a pooled connection
// would be handed to other queries and its LISTEN lost). On a drop it reconnects with backoff, LISTENs again and
// catches up from the events table, so nothing committed meanwhile is missed. Notifications only say "something
// new"; the rows themselves are read by id from the table, in id order (see events.ts for why that order is safe).
import pg from 'pg';
import { config } from '../config';
import { db } from '../db';
import { pruneEvents } from '../db/board';
import { CHANNEL } from './events';
import { publish } from './hub';
import { frame } from './stream';
import { errorDetails, log } from '../log';
import type { Delivered } from './hub';

const BATCH = 500;
/** A safety net: even if a notification were lost, nothing waits longer than this. */
const POLL_MS = 5_000;

let client: pg.Client | null = null;
let lastSeen = -1;
let starting: Promise<void> | null = null;
let fetching: Promise<void> | null = null;
let again = false;
let retryMs = 250;
let poll: ReturnType<typeof setInterval> | null = null;
let prune: ReturnType<typeof setInterval> | null = null;
const PRUNE_MS = 60 * 60_000;

/** One instance at a time prunes (a session-level try-lock); the others skip this round. */
async function pruneOnce() {
	try {
		await db().transaction(async (trx) => {
			const { rows } = await trx.raw('SELECT pg_try_advisory_xact_lock(?) AS got', [0x4c75706e]);
			if (rows[0].got) await pruneEvents();
		});
	} catch (error) {
		log.warn({ err: errorDetails(error) }, 'live: pruning events failed');
	}
}
let stopped = false;
let connectedAt = 0;

export interface ListenerState {
	connected: boolean;
	lastSeen: number;
	connectedAt: number;
	backendPid: number | null;
}

let backendPid: number | null = null;

export function state(): ListenerState {
	return { connected: client !== null, lastSeen, connectedAt, backendPid };
}

/** Starts the listener once per instance; later calls wait for the first start. */
export function ensureStarted(): Promise<void> {
	stopped = false;
	starting ??= connect().catch((error) => {
		starting = null;
		throw error;
	});
	return starting;
}

async function connect(): Promise<void> {
	if (lastSeen < 0) {
		const row = await db()('events').max({ max: 'id' }).first();
		lastSeen = Number(row?.max ?? 0);
	}
	const c = new pg.Client({
		connectionString: config().DATABASE_URL,
		application_name: `lugline-listen:${process.env.PORT ?? 'dev'}`
	});
	c.on('notification', () => void catchUp());
	const dropped = () => {
		if (client !== c) return;
		client = null;
		backendPid = null;
		c.removeAllListeners('notification');
		c.end().catch(() => {});
		scheduleReconnect();
	};
	c.on('error', dropped);
	c.on('end', dropped);
	await c.connect();
	await c.query(`LISTEN ${CHANNEL}`);
	const pid = await c.query('SELECT pg_backend_pid() AS pid');
	client = c;
	backendPid = Number(pid.rows[0].pid);
	connectedAt = Date.now();
	retryMs = 250;
	poll ??= setInterval(() => void catchUp(), POLL_MS);
	poll.unref();
	prune ??= setInterval(() => void pruneOnce(), PRUNE_MS);
	prune.unref();
	// Whatever committed while we were not listening.
	await catchUp();
}

function scheduleReconnect() {
	if (stopped) return;
	const wait = retryMs;
	// At most 2 s apart: after a database restart the screens are live again within about 2 s of it accepting connections.
	retryMs = Math.min(retryMs * 2, 2_000);
	setTimeout(() => {
		connect().catch((error) => {
			log.warn({ err: errorDetails(error) }, 'live: LISTEN connection failed; retrying');
			scheduleReconnect();
		});
	}, wait).unref();
}

/** Reads and publishes every event after `lastSeen`, in id order. Concurrent calls coalesce into one more pass. */
export function catchUp(): Promise<void> {
	if (fetching) {
		again = true;
		return fetching;
	}
	fetching = (async () => {
		try {
			do {
				again = false;
				for (;;) {
					const rows: { id: number; store_id: number; type: string; payload: object; created_at: Date }[] = await db()(
						'events'
					)
						.select('id', 'store_id', 'type', 'payload', 'created_at')
						.where('id', '>', lastSeen)
						.orderBy('id')
						.limit(BATCH);
					for (const row of rows) {
						lastSeen = Number(row.id);
						publish(toDelivered(row));
					}
					if (rows.length < BATCH) break;
				}
			} while (again);
		} catch (error) {
			// The database is away; the next notification, poll or reconnect tries again.
			log.warn({ err: errorDetails(error) }, 'live: catching up failed');
		} finally {
			fetching = null;
		}
	})();
	return fetching;
}

export function toDelivered(row: {
	id: number;
	store_id: number;
	type: string;
	payload: object;
	created_at: Date;
}): Delivered {
	const id = Number(row.id);
	const body = { id, type: row.type, at: new Date(row.created_at).toISOString(), ...(row.payload as object) };
	const json = JSON.stringify(body);
	return { id, storeId: row.store_id, json, frame: frame('floor', json) };
}

export async function stop(): Promise<void> {
	stopped = true;
	if (poll) clearInterval(poll);
	if (prune) clearInterval(prune);
	poll = null;
	prune = null;
	const c = client;
	client = null;
	starting = null;
	await c?.end().catch(() => {});
}

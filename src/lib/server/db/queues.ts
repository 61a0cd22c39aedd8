// Bay queues. Every wheel that is queued or working in a bay has a place 1..n in that bay's queue, working wheels
// first; done wheels keep their bay (where the work was done) and no place. Any change keeps the places unique and
// gap-free. Renumbered neighbours keep their version: their place moved, but nobody edited them.
//
// Lock order, the same in every write, so two writes never wait for each other in a circle:
//   1. bays (in id order)   2. jobs (in id order)   3. wheels (in id order)   4. the events ordering lock (last).
import type { Knex } from 'knex';
import type { MoveWheels } from '$lib/schemas/floor';
import { NotAllowedNow, NotFound, VersionConflict } from '../errors';
import type { Actor } from './actor';
import { databaseMessage, db } from './index';
import { wheelViews } from './views';

export interface BayRow {
	id: number;
	code: string;
	active: boolean;
	tech_id: number | null;
}

export async function lockBays(
	trx: Knex.Transaction,
	storeId: number,
	ids: Iterable<number>
): Promise<Map<number, BayRow>> {
	const unique = [...new Set(ids)].sort((a, b) => a - b);
	if (unique.length === 0) return new Map();
	const rows: (BayRow & { store_id: number })[] = await trx('bays')
		.select('id', 'code', 'active', 'tech_id', 'store_id')
		.whereIn('id', unique)
		.orderBy('id')
		.forUpdate();
	if (rows.length !== unique.length || rows.some((r) => r.store_id !== storeId))
		throw new NotFound('No such bay in your store.');
	return new Map(rows.map((r) => [r.id, r]));
}

interface LaneWheel {
	id: number;
	state: string;
	queue_position: number | null;
}

/** The live wheels of a bay in queue order. */
async function lane(trx: Knex.Transaction, bayId: number): Promise<LaneWheel[]> {
	return trx('wheels')
		.select('id', 'state', 'queue_position')
		.where({ bay_id: bayId })
		.whereNot({ state: 'done' })
		.orderByRaw(`(state = 'working') DESC, queue_position NULLS LAST, id`);
}

/** Gives `ordered` the places 1..n in one statement; returns the ids whose place changed. */
async function writeOrder(trx: Knex.Transaction, ordered: LaneWheel[]): Promise<number[]> {
	const changed = ordered.flatMap((w, i) => (w.queue_position === i + 1 ? [] : [[w.id, i + 1]]));
	if (changed.length === 0) return [];
	await trx.raw(
		`UPDATE wheels SET queue_position = v.place
		   FROM unnest(?::int[], ?::int[]) AS v(id, place) WHERE wheels.id = v.id`,
		[changed.map((c) => c[0]), changed.map((c) => c[1])]
	);
	return changed.map((c) => c[0]);
}

/** Closes the gaps a leaving wheel left, working wheels first. */
export async function renumber(trx: Knex.Transaction, bayId: number): Promise<number[]> {
	return writeOrder(trx, await lane(trx, bayId));
}

/** Takes every wheel of a job out of its bay (a cancelled job); the caller has locked the bays. */
export async function removeFromBays(trx: Knex.Transaction, jobId: number): Promise<number[]> {
	const wheels: { id: number; bay_id: number | null }[] = await trx('wheels')
		.select('id', 'bay_id')
		.where({ job_id: jobId })
		.orderBy('id')
		.forUpdate();
	const bays = [...new Set(wheels.filter((w) => w.bay_id !== null).map((w) => w.bay_id as number))];
	if (bays.length === 0) return [];
	await trx('wheels')
		.where({ job_id: jobId })
		.whereNotNull('bay_id')
		.whereNot({ state: 'done' })
		.update({
			bay_id: null,
			queue_position: null,
			version: trx.raw('version + 1'),
			updated_at: trx.fn.now()
		});
	const changed = wheels.filter((w) => w.bay_id !== null).map((w) => w.id);
	for (const bay of bays) changed.push(...(await renumber(trx, bay)));
	return [...new Set(changed)];
}

/** The rows the move touched and the id of its event, so a screen can tell the answer from what the stream brings. */
export interface MoveResult {
	wheels: Awaited<ReturnType<typeof wheelViews>>;
	eventId: number;
}

/**
 * Moves wheels into a bay at a place in its queue (default: the end), or back to the waiting line (`bayId: null`).
 * All or none: one stale version or one wheel that is not queued and nothing moves.
 *
 * The floor's hottest write runs as one database function (migrations/…_move-wheels-function.ts) in one round trip:
 * it locks bays, then jobs and wheels, checks versions and states, renumbers every bay involved, and writes the
 * audit row and the event. Its refusals come back as our own SQLSTATEs.
 */
export async function move(actor: Actor, input: MoveWheels, attempt = 1): Promise<MoveResult> {
	const ids = input.wheels.map((w) => w.id);
	try {
		const { rows } = await db().raw('SELECT lugline_move_wheels(?, ?, ?::int[], ?::int[], ?, ?) AS result', [
			actor.storeId,
			actor.userId,
			ids,
			input.wheels.map((w) => w.version),
			input.bayId,
			input.queuePosition ?? null
		] as unknown as Knex.RawBinding[]);
		const result = rows[0].result as MoveResult;
		return { wheels: result.wheels, eventId: Number(result.eventId) };
	} catch (error) {
		const { code } = error as { code?: string };
		const message = databaseMessage(error);
		if (code === 'LG404') throw new NotFound(message);
		if (code === 'LG422') throw new NotAllowedNow(message || 'Not allowed now.');
		if (code === 'LG409') throw new VersionConflict({ wheels: await wheelViews(db(), ids) });
		// A deadlock or serialisation failure means nothing was written: one more try.
		if ((code === '40P01' || code === '40001') && attempt < 4) return move(actor, input, attempt + 1);
		throw error;
	}
}

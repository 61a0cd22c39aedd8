// Bay queues. Every wheel that is queued or working in a bay has a place 1..n in that bay's queue, working wheels
// first; done wheels keep their bay (where the work was done) and no place. Any change keeps the places unique and
// gap-free. Renumbered neighbours keep their version: their place moved, but nobody edited them.
//
// Lock order, the same in every write, so two writes never wait for each other in a circle:
//   1. bays (in id order)   2. jobs (in id order)   3. wheels (in id order)   4. the events ordering lock (last).
import type { Knex } from 'knex';
import type { MoveWheels } from '$lib/schemas/floor';
import { NotAllowedNow, NotFound, VersionConflict } from '../errors';
import * as events from '../live/events';
import type { Actor } from './actor';
import { inTransaction, Retry } from './transaction';
import { toWheelView, wheelViews } from './views';

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

interface LockedWheel {
	id: number;
	version: number;
	state: string;
	bay_id: number | null;
	position: string;
	job_id: number;
	number: number;
	job_state: string;
	store_id: number;
}

/**
 * Moves wheels into a bay at a place in its queue (default: the end), or back to the waiting line (`bayId: null`).
 * All or none: one stale version or one wheel that is not queued and nothing moves.
 *
 * This is the floor's hottest write, so it is written as few round trips: lock the bays (finding them from the
 * wheels in the same statement), lock jobs and wheels together, read the lanes of every bay involved at once, write
 * every new place in one UPDATE that returns the rows for the event, then the audit row and the event in one call.
 */
export async function move(actor: Actor, input: MoveWheels): Promise<MoveResult> {
	return inTransaction(async (trx) => {
		const ids = input.wheels.map((w) => w.id);
		const { rows: bayRows } = await trx.raw(
			`SELECT id, code, active, tech_id, store_id FROM bays
			  WHERE id IN (SELECT bay_id FROM wheels WHERE id = ANY(?) AND bay_id IS NOT NULL) OR id = ?
			  ORDER BY id FOR UPDATE`,
			[ids, input.bayId ?? 0]
		);
		const bays = new Map<number, BayRow & { store_id: number }>(
			bayRows.map((b: BayRow & { store_id: number }) => [b.id, b])
		);
		if (input.bayId !== null && bays.get(input.bayId)?.store_id !== actor.storeId)
			throw new NotFound('No such bay in your store.');
		// Jobs before wheels (the lock order), in one statement: rows come, and are locked, in job then wheel order.
		const { rows }: { rows: LockedWheel[] } = await trx.raw(
			`SELECT w.id, w.version, w.state, w.bay_id, w.position, w.job_id, j.number, j.state AS job_state, j.store_id
			   FROM jobs j JOIN wheels w ON w.job_id = j.id
			  WHERE w.id = ANY(?) ORDER BY j.id, w.id FOR UPDATE OF j, w`,
			[ids]
		);
		if (rows.length !== ids.length || rows.some((w) => w.store_id !== actor.storeId)) {
			throw new NotFound('No such wheel in your store.');
		}
		const byId = new Map(rows.map((r) => [r.id, r]));
		if (input.wheels.some((w) => byId.get(w.id)!.version !== w.version)) {
			throw new VersionConflict({ wheels: await wheelViews(trx, ids) });
		}
		for (const r of rows) {
			if (r.job_state === 'cancelled' || r.job_state === 'collected') {
				throw new NotAllowedNow(`Job ${r.number} is ${r.job_state}: its wheels stay where they are.`);
			}
			if (r.state !== 'queued') {
				throw new NotAllowedNow(
					`Wheel ${r.position} of job ${r.number} is ${r.state === 'working' ? 'being worked on' : 'done'}: only queued wheels move.`
				);
			}
			// Moved into another bay between the two statements: its bay is not locked. Start over.
			if (r.bay_id !== null && !bays.has(r.bay_id)) throw new Retry();
		}
		const dest = input.bayId === null ? null : bays.get(input.bayId)!;
		if (dest && !dest.active) throw new NotAllowedNow(`Bay ${dest.code} is out of service.`);

		const involved = [...bays.keys()];
		const { rows: laneRows }: { rows: (LaneWheel & { bay_id: number })[] } = await trx.raw(
			`SELECT id, bay_id, state, queue_position FROM wheels WHERE bay_id = ANY(?) AND state <> 'done'
			  ORDER BY bay_id, (state = 'working') DESC, queue_position NULLS LAST, id`,
			[involved]
		);
		const moving = new Set(ids);
		// id → [bay, place, bump]; only rows whose bay or place changes, plus every moving wheel.
		const writes = new Map<number, [number | null, number | null, number]>();
		for (const bayId of involved) {
			const rest = laneRows.filter((w) => w.bay_id === bayId && !moving.has(w.id));
			let ordered: { id: number; queue_position: number | null }[] = rest;
			if (bayId === dest?.id) {
				const working = rest.filter((w) => w.state === 'working').length;
				const at = Math.min(Math.max((input.queuePosition ?? rest.length + 1) - 1, working), rest.length);
				const incoming = ids.map((id) => ({ id, queue_position: null }));
				ordered = [...rest.slice(0, at), ...incoming, ...rest.slice(at)];
			}
			ordered.forEach((w, i) => {
				if (moving.has(w.id)) writes.set(w.id, [bayId, i + 1, 1]);
				else if (w.queue_position !== i + 1) writes.set(w.id, [bayId, i + 1, 0]);
			});
		}
		for (const id of ids) if (!writes.has(id)) writes.set(id, [null, null, 1]); // to the waiting line
		const entries = [...writes.entries()];
		const { rows: updated } = await trx.raw(
			`UPDATE wheels w SET bay_id = v.bay, queue_position = v.place, version = w.version + v.bump,
			        updated_at = CASE WHEN v.bump = 1 THEN now() ELSE w.updated_at END
			   FROM unnest(?::int[], ?::int[], ?::int[], ?::int[]) AS v(id, bay, place, bump)
			  WHERE w.id = v.id
			 RETURNING w.id, w.job_id, w.position, w.bay_id, w.queue_position, w.state, w.tech_id, w.started_at, w.finished_at, w.version`,
			[
				entries.map((e) => e[0]),
				entries.map((e) => e[1][0]),
				entries.map((e) => e[1][1]),
				entries.map((e) => e[1][2])
			] as unknown as Knex.RawBinding[]
		);
		const views = (updated as Record<string, never>[])
			.map(toWheelView)
			.sort((x, y) => x.jobId - y.jobId || order(x.position) - order(y.position));
		const eventId = await events.append(
			trx,
			{
				storeId: actor.storeId,
				type: ids.length === 1 ? 'wheel.moved' : 'wheels.moved',
				entity: 'wheel',
				entityId: ids[0],
				wheels: views
			},
			{
				userId: actor.userId,
				action: 'move',
				detail: { wheels: ids, to: dest?.code ?? 'waiting', at: input.queuePosition ?? null }
			}
		);
		return { wheels: views, eventId };
	});
}

const positions = ['LF', 'RF', 'LR', 'RR', 'SP'];
const order = (position: string) => positions.indexOf(position);

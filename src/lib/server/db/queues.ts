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
import * as audit from './audit';
import { inTransaction } from './transaction';
import { wheelViews } from './views';

export interface BayRow {
	id: number;
	code: string;
	active: boolean;
	tech_id: number | null;
}

export async function lockBays(trx: Knex.Transaction, storeId: number, ids: Iterable<number>): Promise<Map<number, BayRow>> {
	const unique = [...new Set(ids)].sort((a, b) => a - b);
	if (unique.length === 0) return new Map();
	const rows: (BayRow & { store_id: number })[] = await trx('bays')
		.select('id', 'code', 'active', 'tech_id', 'store_id')
		.whereIn('id', unique)
		.orderBy('id')
		.forUpdate();
	if (rows.length !== unique.length || rows.some((r) => r.store_id !== storeId)) throw new NotFound('No such bay in your store.');
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

/** Gives `ordered` the places 1..n; returns the ids whose place changed. */
async function writeOrder(trx: Knex.Transaction, ordered: LaneWheel[]): Promise<number[]> {
	const changed: number[] = [];
	for (const [i, w] of ordered.entries()) {
		if (w.queue_position !== i + 1) {
			await trx('wheels').where({ id: w.id }).update({ queue_position: i + 1 });
			changed.push(w.id);
		}
	}
	return changed;
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
	await trx('wheels').where({ job_id: jobId }).whereNotNull('bay_id').whereNot({ state: 'done' }).update({
		bay_id: null,
		queue_position: null,
		version: trx.raw('version + 1'),
		updated_at: trx.fn.now()
	});
	const changed = wheels.filter((w) => w.bay_id !== null).map((w) => w.id);
	for (const bay of bays) changed.push(...(await renumber(trx, bay)));
	return [...new Set(changed)];
}

export interface MoveResult {
	wheels: Awaited<ReturnType<typeof wheelViews>>;
}

/**
 * Moves wheels into a bay at a place in its queue (default: the end), or back to the waiting line (`bayId: null`).
 * All or none: one stale version or one wheel that is not queued and nothing moves.
 */
export async function move(actor: Actor, input: MoveWheels): Promise<MoveResult> {
	return inTransaction(async (trx) => {
		const ids = input.wheels.map((w) => w.id);
		const peek: { id: number; bay_id: number | null; job_id: number; store_id: number }[] = await trx('wheels as w')
			.join('jobs as j', 'j.id', 'w.job_id')
			.select('w.id', 'w.bay_id', 'w.job_id', 'j.store_id')
			.whereIn('w.id', ids);
		if (peek.length !== ids.length || peek.some((w) => w.store_id !== actor.storeId)) {
			throw new NotFound('No such wheel in your store.');
		}
		const sources = peek.filter((w) => w.bay_id !== null).map((w) => w.bay_id as number);
		const bays = await lockBays(trx, actor.storeId, input.bayId === null ? sources : [...sources, input.bayId]);
		const jobIds = [...new Set(peek.map((w) => w.job_id))].sort((a, b) => a - b);
		const jobs: { id: number; number: number; state: string }[] = await trx('jobs')
			.select('id', 'number', 'state')
			.whereIn('id', jobIds)
			.orderBy('id')
			.forUpdate();
		const rows: { id: number; version: number; state: string; bay_id: number | null; position: string; job_id: number }[] =
			await trx('wheels')
				.select('id', 'version', 'state', 'bay_id', 'position', 'job_id')
				.whereIn('id', ids)
				.orderBy('id')
				.forUpdate();
		const byId = new Map(rows.map((r) => [r.id, r]));
		if (input.wheels.some((w) => byId.get(w.id)?.version !== w.version)) {
			throw new VersionConflict({ wheels: await wheelViews(trx, ids) });
		}
		for (const r of rows) {
			const job = jobs.find((j) => j.id === r.job_id)!;
			if (job.state === 'cancelled' || job.state === 'collected') {
				throw new NotAllowedNow(`Job ${job.number} is ${job.state}: its wheels stay where they are.`);
			}
			if (r.state !== 'queued') {
				throw new NotAllowedNow(
					`Wheel ${r.position} of job ${job.number} is ${r.state === 'working' ? 'being worked on' : 'done'}: only queued wheels move.`
				);
			}
		}
		const dest = input.bayId === null ? null : bays.get(input.bayId)!;
		if (dest && !dest.active) throw new NotAllowedNow(`Bay ${dest.code} is out of service.`);

		const moving = new Set(ids);
		const changed = new Set<number>(ids);
		for (const bayId of new Set(sources)) {
			if (bayId === dest?.id) continue;
			const rest = (await lane(trx, bayId)).filter((w) => !moving.has(w.id));
			for (const id of await writeOrder(trx, rest)) changed.add(id);
		}
		if (dest) {
			const rest = (await lane(trx, dest.id)).filter((w) => !moving.has(w.id));
			const working = rest.filter((w) => w.state === 'working').length;
			const at = Math.min(Math.max((input.queuePosition ?? rest.length + 1) - 1, working), rest.length);
			const incoming = input.wheels.map((w) => ({ id: w.id, state: 'queued', queue_position: null }));
			const ordered = [...rest.slice(0, at), ...incoming, ...rest.slice(at)];
			await trx('wheels')
				.whereIn('id', ids)
				.update({ bay_id: dest.id, queue_position: null, version: trx.raw('version + 1'), updated_at: trx.fn.now() });
			for (const id of await writeOrder(trx, ordered)) changed.add(id);
		} else {
			await trx('wheels')
				.whereIn('id', ids)
				.update({ bay_id: null, queue_position: null, version: trx.raw('version + 1'), updated_at: trx.fn.now() });
		}
		await audit.record(trx, actor, 'move', 'wheel', ids[0], { wheels: ids, to: dest?.code ?? 'waiting', at: input.queuePosition ?? null });
		const views = await wheelViews(trx, [...changed]);
		await events.append(trx, {
			storeId: actor.storeId,
			type: ids.length === 1 ? 'wheel.moved' : 'wheels.moved',
			entity: 'wheel',
			entityId: ids[0],
			wheels: views
		});
		return { wheels: views };
	});
}

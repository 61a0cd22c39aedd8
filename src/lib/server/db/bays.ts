// The manager's bays: add, rename, reorder, take out of service and back. Every change is one transaction that
// locks bays first (the floor's lock order: bays → jobs → wheels → the events lock), checks the version the form
// showed, writes the audit row and ends with the event every screen applies (the bays as they now look, and for a
// bay taken out of service the wheels sent back to waiting).
import type { Knex } from 'knex';
import { db } from './index';
import * as audit from './audit';
import { bayViews, wheelViews } from './views';
import { inTransaction } from './transaction';
import * as events from '../live/events';
import { NotAllowedNow, NotFound, VersionConflict } from '../errors';
import type { Actor } from './actor';

export interface ManagedBay {
	id: number;
	code: string;
	name: string;
	position: number;
	active: boolean;
	version: number;
	/** Queued and working wheels in the bay now. */
	queued: number;
	working: number;
}

export async function list(storeId: number): Promise<ManagedBay[]> {
	const { rows } = await db().raw(
		`SELECT b.id, b.code, b.name, b.position, b.active, b.version,
		        count(w.id) FILTER (WHERE w.state = 'queued')::int AS queued,
		        count(w.id) FILTER (WHERE w.state = 'working')::int AS working
		   FROM bays b LEFT JOIN wheels w ON w.bay_id = b.id AND w.state <> 'done'
		  WHERE b.store_id = ?
		  GROUP BY b.id ORDER BY b.position, b.id`,
		[storeId]
	);
	return rows;
}

export class CodeTaken extends NotAllowedNow {
	constructor(code: string) {
		super(`Bay ${code} already exists in this store.`, 'code_taken');
	}
}

async function announce(trx: Knex.Transaction, actor: Actor, type: string, bayIds: number[], wheelIds: number[] = []) {
	await events.append(trx, {
		storeId: actor.storeId,
		type,
		entity: 'bay',
		entityId: bayIds[0],
		bays: await bayViews(trx, actor.storeId, bayIds),
		wheels: await wheelViews(trx, wheelIds)
	});
}

/** Locks every bay of the store (in id order, as claims and moves do) and returns them in screen order. */
async function lockAll(trx: Knex.Transaction, storeId: number) {
	const rows = await trx('bays')
		.select('id', 'code', 'position', 'active', 'version')
		.where({ store_id: storeId })
		.orderBy('id')
		.forUpdate();
	return (rows as { id: number; code: string; position: number; active: boolean; version: number }[]).sort(
		(a, b) => a.position - b.position || a.id - b.id
	);
}

function checked<T extends { id: number; version: number }>(rows: T[], id: number, version: number): T {
	const bay = rows.find((b) => b.id === id);
	if (!bay) throw new NotFound('No such bay in your store.');
	if (bay.version !== version) throw new VersionConflict(bay);
	return bay;
}

export async function create(actor: Actor, input: { code: string; name: string }): Promise<number> {
	try {
		return await inTransaction(async (trx) => {
			const all = await lockAll(trx, actor.storeId);
			if (all.some((b) => b.code.toLowerCase() === input.code.toLowerCase())) throw new CodeTaken(input.code);
			const position = Math.max(0, ...all.map((b) => b.position)) + 1;
			const [row] = await trx('bays')
				.insert({ store_id: actor.storeId, code: input.code, name: input.name, position })
				.returning('id');
			await audit.record(trx, actor, 'create', 'bay', row.id, { code: input.code, name: input.name });
			await announce(trx, actor, 'bay.added', [row.id]);
			return row.id as number;
		});
	} catch (e) {
		if ((e as { code?: string }).code === '23505') throw new CodeTaken(input.code);
		throw e;
	}
}

export async function rename(actor: Actor, id: number, version: number, name: string): Promise<void> {
	await inTransaction(async (trx) => {
		const [bay] = await trx('bays').select('id', 'name', 'version').where({ id, store_id: actor.storeId }).forUpdate();
		checked(bay ? [bay] : [], id, version);
		await trx('bays')
			.where({ id })
			.update({ name, version: version + 1, updated_at: trx.fn.now() });
		await audit.record(trx, actor, 'rename', 'bay', id, { from: bay.name, to: name });
		await announce(trx, actor, 'bay.renamed', [id]);
	});
}

/** Swaps the bay with its neighbour above (-1) or below (+1) in the store's order; positions become 1..n. */
export async function reorder(actor: Actor, id: number, version: number, by: -1 | 1): Promise<void> {
	await inTransaction(async (trx) => {
		const all = await lockAll(trx, actor.storeId);
		const bay = checked(all, id, version);
		const at = all.indexOf(bay);
		const to = at + by;
		if (to < 0 || to >= all.length) throw new NotAllowedNow(`Bay ${bay.code} is already ${by < 0 ? 'first' : 'last'}.`);
		[all[at], all[to]] = [all[to], all[at]];
		const changed: number[] = [];
		for (const [i, b] of all.entries()) {
			if (b.position === i + 1 && b.id !== id) continue;
			await trx('bays')
				.where({ id: b.id })
				.update({
					position: i + 1,
					version: b.id === id ? version + 1 : b.version,
					updated_at: trx.fn.now()
				});
			changed.push(b.id);
		}
		await audit.record(trx, actor, 'reorder', 'bay', id, { code: bay.code, to: to + 1 });
		await announce(trx, actor, 'bays.reordered', [id, ...changed.filter((c) => c !== id)]);
	});
}

/**
 * Takes a bay out of service (its queued wheels go back to the waiting line; a wheel being worked on stays until
 * it is finished or stopped, and nothing new can be sent there) or puts it back in service.
 * Returns how many wheels went back to waiting.
 */
export async function setActive(actor: Actor, id: number, version: number, active: boolean): Promise<number> {
	return inTransaction(async (trx) => {
		const [bay] = await trx('bays')
			.select('id', 'code', 'active', 'version')
			.where({ id, store_id: actor.storeId })
			.forUpdate();
		checked(bay ? [bay] : [], id, version);
		if (bay.active === active)
			throw new NotAllowedNow(`Bay ${bay.code} is already ${active ? 'in service' : 'out of service'}.`);
		let moved: number[] = [];
		if (!active) {
			// Lock order: bays (above) → jobs → wheels. Working wheels come first in a lane, so the ones that stay
			// keep their places 1..k; the queued ones leave the lane and bump their version (they moved).
			await trx.raw(
				`SELECT 1 FROM jobs j JOIN wheels w ON w.job_id = j.id WHERE w.bay_id = ? AND w.state = 'queued'
				  ORDER BY j.id, w.id FOR UPDATE OF j, w`,
				[id]
			);
			const rows = await trx('wheels')
				.where({ bay_id: id, state: 'queued' })
				.update({ bay_id: null, queue_position: null, version: trx.raw('version + 1'), updated_at: trx.fn.now() })
				.returning('id');
			moved = rows.map((r: { id: number }) => r.id).sort((a: number, b: number) => a - b);
		}
		await trx('bays')
			.where({ id })
			.update({ active, version: version + 1, updated_at: trx.fn.now() });
		await audit.record(trx, actor, active ? 'in_service' : 'out_of_service', 'bay', id, {
			code: bay.code,
			...(active ? {} : { wheels: moved })
		});
		await announce(trx, actor, active ? 'bay.in_service' : 'bay.out_of_service', [id], moved);
		return moved.length;
	});
}

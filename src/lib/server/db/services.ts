// The services a store sells, as the manager edits them: name, standard minutes per wheel or per job, whether
// balancing is part of it, and whether the counter can still put it on a job. The queue forecast and the pace read
// the standard minutes (stores.services()). A service is never deleted (old jobs refer to it); it is made inactive.
import { db } from './index';
import * as audit from './audit';
import { inTransaction } from './transaction';
import { NotAllowedNow, NotFound, VersionConflict } from '../errors';
import type { Actor } from './actor';
import type { ServiceInput } from '$lib/schemas/manage';

export interface ManagedService extends ServiceInput {
	id: number;
	version: number;
}

const columns = {
	id: 'id',
	code: 'code',
	name: 'name',
	standardMinutes: 'standard_minutes',
	per: 'per',
	needsBalance: 'needs_balance',
	active: 'active',
	version: 'version'
};

const fromRow = (r: ManagedService): ManagedService => ({ ...r, standardMinutes: Number(r.standardMinutes) });

export async function list(storeId: number): Promise<ManagedService[]> {
	const rows = await db()('services').select(columns).where({ store_id: storeId }).orderBy(['position', 'code']);
	return rows.map(fromRow);
}

export class ServiceCodeTaken extends NotAllowedNow {
	constructor(code: string) {
		super(`A service with the code ${code} already exists.`, 'code_taken');
	}
}

const toRow = (s: ServiceInput) => ({
	code: s.code,
	name: s.name,
	standard_minutes: s.standardMinutes,
	per: s.per,
	needs_balance: s.needsBalance,
	active: s.active
});

export async function create(actor: Actor, input: ServiceInput): Promise<number> {
	try {
		return await inTransaction(async (trx) => {
			const last = await trx('services').where({ store_id: actor.storeId }).max('position as max').first();
			const [row] = await trx('services')
				.insert({ store_id: actor.storeId, ...toRow(input), position: Number(last?.max ?? 0) + 1 })
				.returning('id');
			await audit.record(trx, actor, 'create', 'service', row.id, { ...input });
			return row.id as number;
		});
	} catch (e) {
		if ((e as { code?: string }).code === '23505') throw new ServiceCodeTaken(input.code);
		throw e;
	}
}

export async function update(actor: Actor, id: number, version: number, input: ServiceInput): Promise<void> {
	try {
		await inTransaction(async (trx) => {
			const current = await trx('services').select(columns).where({ id, store_id: actor.storeId }).forUpdate().first();
			if (!current) throw new NotFound('No such service in your store.');
			if (current.version !== version) throw new VersionConflict(fromRow(current));
			await trx('services')
				.where({ id })
				.update({ ...toRow(input), version: version + 1, updated_at: trx.fn.now() });
			const before = fromRow(current);
			const changed = Object.fromEntries(
				(Object.keys(input) as (keyof ServiceInput)[])
					.filter((k) => before[k] !== input[k])
					.map((k) => [k, { from: before[k], to: input[k] }])
			);
			await audit.record(trx, actor, 'update', 'service', id, changed);
		});
	} catch (e) {
		if ((e as { code?: string }).code === '23505') throw new ServiceCodeTaken(input.code);
		throw e;
	}
}

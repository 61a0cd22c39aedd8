// The wheel record: what was measured and done to one wheel, saved in parts as the work goes (each save an event,
// so every screen showing the wheel hears of it). Values are SI; the screens convert at the edge. Concurrent saves
// are refused with 409 rather than overwriting each other: each carries the record version its screen saw.
import type { Knex } from 'knex';
import type { RecordPatch, RecordView } from '$lib/schemas/record';
import { Forbidden, NotFound, VersionConflict } from '../errors';
import * as events from '../live/events';
import { leads, type Actor } from './actor';
import * as audit from './audit';
import { inTransaction } from './transaction';
import { wheelViews } from './views';
import { db } from './index';

/** Record field → column. */
const columns = {
	treadDepthMm: 'tread_depth_mm',
	dotCode: 'dot_code',
	pressureSetKpa: 'pressure_set_kpa',
	weights: 'weights',
	forceBeforeN: 'force_before_n',
	forceAfterN: 'force_after_n',
	matchMounted: 'match_mounted',
	matchMountDeg: 'match_mount_deg',
	torqueAppliedNm: 'torque_applied_nm',
	damage: 'damage',
	notes: 'notes'
} as const satisfies Record<Exclude<keyof RecordPatch, 'version'>, string>;

const numeric = new Set<string>([
	'tread_depth_mm',
	'pressure_set_kpa',
	'force_before_n',
	'force_after_n',
	'match_mount_deg',
	'torque_applied_nm'
]);
const asNumber = (v: unknown) => (v === null || v === undefined ? null : Number(v));

function toView(wheelId: number, r: Record<string, unknown> | undefined): RecordView {
	return {
		wheelId,
		version: r ? Number(r.version) : 0,
		treadDepthMm: asNumber(r?.tread_depth_mm),
		dotCode: (r?.dot_code as string | null) ?? null,
		pressureSetKpa: asNumber(r?.pressure_set_kpa),
		weights: (r?.weights as RecordView['weights']) ?? [],
		forceBeforeN: asNumber(r?.force_before_n),
		forceAfterN: asNumber(r?.force_after_n),
		matchMounted: Boolean(r?.match_mounted),
		matchMountDeg: asNumber(r?.match_mount_deg),
		torqueAppliedNm: asNumber(r?.torque_applied_nm),
		// The column defaults to {}: every view carries both lists.
		damage: { tire: [], rim: [], ...((r?.damage as Partial<RecordView['damage']>) ?? {}) },
		notes: (r?.notes as string) ?? '',
		recordedBy: r?.recorded_by ? { id: Number(r.recorded_by), name: String(r.recorded_by_name ?? '') } : null,
		updatedAt: r?.updated_at ? new Date(r.updated_at as string).toISOString() : null
	};
}

async function current(q: Knex | Knex.Transaction, wheelId: number): Promise<RecordView> {
	const row = await q('wheel_records as r')
		.leftJoin('users as u', 'u.id', 'r.recorded_by')
		.select('r.*', 'u.name as recorded_by_name')
		.where('r.wheel_id', wheelId)
		.first();
	return toView(wheelId, row);
}

async function wheelIn(q: Knex | Knex.Transaction, actor: Actor, wheelId: number, lock = false) {
	const query = q('wheels as w')
		.join('jobs as j', 'j.id', 'w.job_id')
		.leftJoin('bays as b', 'b.id', 'w.bay_id')
		.select('w.id', 'w.tech_id', 'j.store_id', 'b.tech_id as bay_tech_id')
		.where('w.id', wheelId)
		.first();
	if (lock) query.forUpdate('w');
	const row = await query;
	if (!row || row.store_id !== actor.storeId) throw new NotFound('No such wheel in your store.');
	return row as { id: number; tech_id: number | null; bay_tech_id: number | null };
}

export async function read(actor: Actor, wheelId: number): Promise<RecordView> {
	await wheelIn(db(), actor, wheelId);
	return current(db(), wheelId);
}

/** Saves the fields present in the patch (null clears one); fields left out keep what earlier saves recorded. */
export async function save(actor: Actor, wheelId: number, patch: RecordPatch): Promise<RecordView> {
	return inTransaction(async (trx) => {
		const wheel = await wheelIn(trx, actor, wheelId, true);
		if (
			!leads(actor) &&
			actor.role === 'tech' &&
			wheel.tech_id !== actor.userId &&
			wheel.bay_tech_id !== actor.userId
		) {
			throw new Forbidden('Only the technician on this wheel or its bay, a lead or a manager records it.');
		}
		if (!leads(actor) && actor.role !== 'tech')
			throw new Forbidden('Only technicians, leads and managers record wheels.');
		const before = await current(trx, wheelId);
		if (before.version !== patch.version) throw new VersionConflict({ record: before });

		const values: Record<string, unknown> = {};
		for (const [field, column] of Object.entries(columns)) {
			const value = patch[field as keyof typeof columns];
			if (value === undefined) continue;
			values[column] = column === 'weights' || column === 'damage' ? JSON.stringify(value) : value;
			if (numeric.has(column) && value !== null) values[column] = Number(value);
		}
		if (before.version === 0) {
			await trx('wheel_records').insert({ wheel_id: wheelId, ...values, recorded_by: actor.userId, version: 1 });
		} else {
			await trx('wheel_records')
				.where({ wheel_id: wheelId })
				.update({ ...values, recorded_by: actor.userId, version: trx.raw('version + 1'), updated_at: trx.fn.now() });
		}
		await audit.record(trx, actor, 'record', 'wheel', wheelId, { fields: Object.keys(values) });
		await events.append(trx, {
			storeId: actor.storeId,
			type: 'wheel.recorded',
			entity: 'wheel',
			entityId: wheelId,
			wheels: await wheelViews(trx, [wheelId])
		});
		return current(trx, wheelId);
	});
}

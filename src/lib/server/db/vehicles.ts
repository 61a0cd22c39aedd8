// The vehicle wheel-fact data: a compact list for the palette's client index and one record in full for the floor's
// screens; the manager's list, search and edit. Shared by all stores of a chain (no store column); audit rows carry
// the store of the manager who made the change. CSV imports are in ./vehicle-import.ts.
import type { Knex } from 'knex';
import {
	vehicleColumns,
	type VehicleColumn,
	type VehicleData,
	type VehicleEntry,
	type VehicleFacts,
	type VehicleRecord
} from '$lib/schemas/vehicles';
import { NotAllowedNow, NotFound, VersionConflict } from '../errors';
import type { Actor } from './actor';
import * as audit from './audit';
import { inTransaction } from './transaction';
import { db } from './index';

export async function index(): Promise<VehicleEntry[]> {
	const rows = await db()('vehicles')
		.select('id', 'year_from', 'year_to', 'make', 'model', 'trim', 'tire_front', 'tire_rear')
		.orderBy(['make', 'model', 'year_from']);
	return rows.map((v: Record<string, never>) => ({
		id: v.id,
		label: [`${v.year_from}–${v.year_to}`, v.make, v.model, v.trim].filter(Boolean).join(' '),
		sizes: [...new Set([v.tire_front, v.tire_rear])]
	}));
}

export async function read(id: number): Promise<VehicleFacts | undefined> {
	return db()('vehicles')
		.select({
			id: 'id',
			yearFrom: 'year_from',
			yearTo: 'year_to',
			make: 'make',
			model: 'model',
			trim: 'trim',
			studCount: 'stud_count',
			boltCircleMm: 'bolt_circle_mm',
			centreBoreMm: 'centre_bore_mm',
			thread: 'thread',
			hexMm: 'hex_mm',
			torqueNm: 'torque_nm',
			tireFront: 'tire_front',
			tireRear: 'tire_rear',
			placardFrontKpa: 'placard_front_kpa',
			placardRearKpa: 'placard_rear_kpa',
			tpms: 'tpms',
			notes: 'notes',
			source: 'source'
		})
		.where({ id })
		.first();
}

// ---------------------------------------------------------------- the manager's pages: list, read, edit, export

/** One field that differs between two versions of a record. */
export interface FieldChange {
	column: VehicleColumn;
	from: string | number;
	to: string | number;
}

/** The fields whose values differ (numbers arrive as numbers from both sides: db/index.ts parses NUMERIC). */
export function changedFields(before: VehicleData, after: VehicleData): FieldChange[] {
	return vehicleColumns
		.filter((column) => before[column] !== after[column])
		.map((column) => ({ column, from: before[column], to: after[column] }));
}

const recordColumns = [...vehicleColumns, 'id', 'version', 'updated_at'] as const;

function toRecord(row: Record<string, unknown>): VehicleRecord {
	const { updated_at, ...rest } = row;
	return {
		...(rest as unknown as Omit<VehicleRecord, 'updatedAt'>),
		updatedAt: new Date(updated_at as string).toISOString()
	};
}

export async function readRecord(id: number, q: Knex | Knex.Transaction = db()): Promise<VehicleRecord | undefined> {
	const row = await q('vehicles').select(recordColumns).where({ id }).first();
	return row ? toRecord(row) : undefined;
}

export interface VehicleListItem {
	id: number;
	year_from: number;
	year_to: number;
	make: string;
	model: string;
	trim: string;
	stud_count: number;
	bolt_circle_mm: number;
	thread: string;
	torque_nm: number;
	tire_front: string;
	tire_rear: string;
}

export interface VehicleList {
	rows: VehicleListItem[];
	total: number;
	page: number;
	pages: number;
}

const likeEscape = (word: string) => word.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * The manager's list, searched on the server: each word must appear in make, model or trim (the trigram index on
 * `make || ' ' || model || ' ' || trim` serves ILIKE), and a 4-digit word is a model year the record covers.
 */
export async function list(search: { q: string; page: number }, perPage = 50): Promise<VehicleList> {
	const words = search.q.split(/\s+/).filter(Boolean).slice(0, 8);
	const filter = (query: Knex.QueryBuilder) => {
		for (const word of words) {
			if (/^\d{4}$/.test(word)) query.where('year_from', '<=', Number(word)).where('year_to', '>=', Number(word));
			else query.whereRaw(`(make || ' ' || model || ' ' || "trim") ILIKE ?`, [`%${likeEscape(word)}%`]);
		}
		return query;
	};
	const [{ count }] = await filter(db()('vehicles').count({ count: '*' }));
	const total = Number(count);
	const pages = Math.max(1, Math.ceil(total / perPage));
	const page = Math.min(search.page, pages);
	const rows = await filter(
		db()('vehicles').select(
			'id',
			'year_from',
			'year_to',
			'make',
			'model',
			'trim',
			'stud_count',
			'bolt_circle_mm',
			'thread',
			'torque_nm',
			'tire_front',
			'tire_rear'
		)
	)
		.orderBy(['make', 'model', 'year_from', 'trim', 'id'])
		.limit(perPage)
		.offset((page - 1) * perPage);
	return { rows, total, page, pages };
}

const keyOf = (v: VehicleData) => ({
	make: v.make,
	model: v.model,
	trim: v.trim,
	year_from: v.year_from,
	year_to: v.year_to
});

const duplicate = (id: number) =>
	new NotAllowedNow(
		`Vehicle record #${id} already has this make, model, trim and years. Edit that record instead, or change one of them here.`,
		'duplicate_vehicle'
	);

/**
 * Saves a manager's edit of one record, whole or not at all. `version` is the version the form showed: if the record
 * changed since, nothing is written and the caller gets the current record (VersionConflict). A save that changes
 * nothing writes nothing (no new version, no audit row).
 */
export async function update(actor: Actor, id: number, version: number, data: VehicleData): Promise<VehicleRecord> {
	try {
		return await inTransaction(async (trx) => {
			const before = await readRecord(id, trx);
			if (!before) throw new NotFound('No such vehicle record.');
			if (before.version !== version) throw new VersionConflict(before);
			const changes = changedFields(before, data);
			if (changes.length === 0) return before;
			const clash = await trx('vehicles').select('id').where(keyOf(data)).whereNot({ id }).first();
			if (clash) throw duplicate(clash.id);
			// The version in the WHERE clause is the real guard: the read above took no lock, and an import or another
			// manager may have written since. No row lock is held before this statement, so it cannot deadlock with an
			// import's table lock; it waits for the import to commit and then finds the new version.
			const written = await trx('vehicles')
				.where({ id, version })
				.update({ ...data, version: trx.raw('version + 1'), updated_at: trx.fn.now() });
			if (written === 0) throw new VersionConflict(await readRecord(id, trx));
			await audit.record(trx, actor, 'edit', 'vehicle', id, {
				changed: Object.fromEntries(changes.map((c) => [c.column, [c.from, c.to]]))
			});
			return (await readRecord(id, trx))!;
		});
	} catch (e) {
		// Another record took the same key between the check and the write.
		if ((e as { code?: string }).code === '23505') {
			const clash = await db()('vehicles').select('id').where(keyOf(data)).whereNot({ id }).first();
			throw duplicate(clash?.id ?? 0);
		}
		throw e;
	}
}

/** Every record in the CSV format's column order, for the export (which the import reads back unchanged). */
export async function all(): Promise<VehicleData[]> {
	return db()('vehicles').select(vehicleColumns).orderBy(['make', 'model', 'trim', 'year_from', 'year_to']);
}

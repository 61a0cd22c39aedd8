// Importing vehicle data: what a file would change (the preview), and the import itself, in one transaction. Rows
// are matched on the natural key (make, model, trim, year_from, year_to): a new key adds a record, a known key with
// other values changes it (new version, audited field by field), a known key with the same values is left alone (no
// write, no new version). The file is read and checked in ../vehicle-import.ts before any of this runs.
import type { Knex } from 'knex';
import { vehicleColumns, vehicleKeyColumns, type VehicleData } from '$lib/schemas/vehicles';
import type { Actor } from './actor';
import { inTransaction } from './transaction';
import { changedFields, type FieldChange } from './vehicles';
import { db } from './index';

/** A checked row of a file, with the line it starts on. */
export interface ImportRow {
	line: number;
	data: VehicleData;
}

export interface PlannedChange {
	row: ImportRow;
	id: number;
	fields: FieldChange[];
}

export interface Plan {
	added: ImportRow[];
	changed: PlannedChange[];
	unchanged: number;
}

export interface Counts {
	added: number;
	changed: number;
	unchanged: number;
}

export const countsOf = (plan: Plan): Counts => ({
	added: plan.added.length,
	changed: plan.changed.length,
	unchanged: plan.unchanged
});

/** The preview the manager confirmed no longer describes what the import would do: nothing was written. */
export class StalePlan extends Error {
	constructor(readonly plan: Plan) {
		super('The vehicle data changed since the preview.');
	}
}

/**
 * Rows per INSERT statement. Each statement carries its rows as one JSON parameter (no limit on bound parameters),
 * so the batch size only bounds the statement's memory; 2,000 rows is about 400 KB of JSON.
 */
export const BATCH_ROWS = 2000;

// Every column is quoted: `trim` is an SQL keyword.
const q = (column: string) => `"${column}"`;
const sqlTypes: Record<string, string> = {
	year_from: 'int',
	year_to: 'int',
	stud_count: 'int',
	bolt_circle_mm: 'numeric',
	centre_bore_mm: 'numeric',
	hex_mm: 'numeric',
	torque_nm: 'numeric',
	placard_front_kpa: 'numeric',
	placard_rear_kpa: 'numeric'
};
const recordset = (columns: readonly string[]) => columns.map((c) => `${q(c)} ${sqlTypes[c] ?? 'text'}`).join(', ');
const keyList = vehicleKeyColumns.map(q).join(', ');
const valueColumns = vehicleColumns.filter((c) => !(vehicleKeyColumns as readonly string[]).includes(c));

const CURRENT_SQL = `SELECT v.id, ${vehicleColumns.map((c) => `v.${q(c)}`).join(', ')}
	FROM json_to_recordset(?::json) AS k(${recordset(vehicleKeyColumns)})
	JOIN vehicles v USING (${keyList})`;

// Multi-row upsert. The WHERE clause leaves a row whose values are all the same untouched (no new version, no dead
// tuple) even if the plan were out of date; (xmax = 0) tells an inserted row from an updated one.
const UPSERT_SQL = `INSERT INTO vehicles AS v (${vehicleColumns.map(q).join(', ')})
	SELECT ${vehicleColumns.map(q).join(', ')} FROM json_to_recordset(?::json) AS r(${recordset(vehicleColumns)})
	ON CONFLICT (${keyList}) DO UPDATE SET
		${valueColumns.map((c) => `${q(c)} = EXCLUDED.${q(c)}`).join(', ')},
		version = v.version + 1, updated_at = now()
	WHERE (${valueColumns.map((c) => `v.${q(c)}`).join(', ')}) IS DISTINCT FROM (${valueColumns.map((c) => `EXCLUDED.${q(c)}`).join(', ')})
	RETURNING v.id, ${vehicleKeyColumns.map((c) => `v.${q(c)}`).join(', ')}, (v.xmax = 0) AS inserted`;

const AUDIT_SQL = `INSERT INTO audit (store_id, user_id, action, entity, entity_id, detail)
	SELECT ?, ?, 'import', 'vehicle', r.id, r.detail FROM json_to_recordset(?::json) AS r(id int, detail jsonb)`;

const keyText = (v: Pick<VehicleData, (typeof vehicleKeyColumns)[number]>) =>
	JSON.stringify([v.make, v.model, v.trim, v.year_from, v.year_to]);

function* batches<T>(items: readonly T[], size: number): Generator<T[]> {
	for (let i = 0; i < items.length; i += size) yield items.slice(i, i + size);
}

/** What importing these rows would do now. The rows' keys are unique (the reader refuses a file that repeats one). */
export async function plan(rows: readonly ImportRow[], query: Knex | Knex.Transaction = db()): Promise<Plan> {
	const current = new Map<string, VehicleData & { id: number }>();
	for (const batch of batches(rows, 10_000)) {
		const keys = batch.map(({ data }) => Object.fromEntries(vehicleKeyColumns.map((c) => [c, data[c]])));
		const { rows: found } = await query.raw(CURRENT_SQL, [JSON.stringify(keys)]);
		for (const v of found as (VehicleData & { id: number })[]) current.set(keyText(v), v);
	}
	const result: Plan = { added: [], changed: [], unchanged: 0 };
	for (const row of rows) {
		const before = current.get(keyText(row.data));
		if (!before) result.added.push(row);
		else {
			const fields = changedFields(before, row.data);
			if (fields.length) result.changed.push({ row, id: before.id, fields });
			else result.unchanged++;
		}
	}
	return result;
}

export interface ImportOutcome extends Counts {
	/** The audit row that describes the whole import. */
	auditId: number;
}

/**
 * Imports the rows in one transaction: all of them or, on any error, none. `expected` is what the manager's preview
 * showed; if the data changed since (another import, an edit), nothing is written and StalePlan carries the new plan.
 * The table is locked against other writers (SHARE ROW EXCLUSIVE: reads go on, edits and other imports wait a few
 * seconds) so the plan, the writes and their audit rows describe the same state.
 */
export async function apply(
	actor: Actor,
	rows: readonly ImportRow[],
	expected: Counts,
	about: { fileName: string; sha256: string }
): Promise<ImportOutcome> {
	return inTransaction(async (trx) => {
		await trx.raw('LOCK TABLE vehicles IN SHARE ROW EXCLUSIVE MODE');
		const planned = await plan(rows, trx);
		const counts = countsOf(planned);
		if (
			counts.added !== expected.added ||
			counts.changed !== expected.changed ||
			counts.unchanged !== expected.unchanged
		)
			throw new StalePlan(planned);

		const writes = [...planned.added.map((r) => r.data), ...planned.changed.map((c) => c.row.data)];
		const written = new Map<string, { id: number; inserted: boolean }>();
		for (const batch of batches(writes, BATCH_ROWS)) {
			const { rows: out } = await trx.raw(UPSERT_SQL, [JSON.stringify(batch)]);
			for (const r of out) written.set(keyText(r), { id: r.id, inserted: r.inserted });
		}
		// With the table locked, every planned write happens as planned; anything else is a bug, and rolls back.
		if (written.size !== writes.length) throw new Error(`import wrote ${written.size} rows, planned ${writes.length}`);

		const details = [
			...planned.added.map((r) => ({ id: written.get(keyText(r.data))!.id, detail: { added: true, line: r.line } })),
			...planned.changed.map((c) => ({
				id: c.id,
				detail: { line: c.row.line, changed: Object.fromEntries(c.fields.map((f) => [f.column, [f.from, f.to]])) }
			}))
		];
		for (const batch of batches(details, BATCH_ROWS))
			await trx.raw(AUDIT_SQL, [actor.storeId, actor.userId, JSON.stringify(batch)]);
		const [summary] = await trx('audit')
			.insert({
				store_id: actor.storeId,
				user_id: actor.userId,
				action: 'import',
				entity: 'vehicles',
				detail: JSON.stringify({ file: about.fileName, sha256: about.sha256, rows: rows.length, ...counts })
			})
			.returning('id');
		return { ...counts, auditId: Number(summary.id) };
	});
}

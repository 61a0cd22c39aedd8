// Fast inserts for the seeds. One `INSERT … SELECT FROM unnest(arrays)` per chunk sends each column as a single array
// parameter, so a chunk of thousands of rows costs one round trip and no SQL text the size of the data.
import type { Knex } from 'knex';

export type ColumnType = 'int' | 'text' | 'bool' | 'numeric' | 'timestamptz' | 'jsonb';

const PG_ARRAY: Record<ColumnType, string> = {
	int: 'int[]',
	text: 'text[]',
	bool: 'boolean[]',
	numeric: 'numeric[]',
	timestamptz: 'timestamptz[]',
	// jsonb travels as text: a JS array of objects would otherwise be sent as a Postgres array of records.
	jsonb: 'text[]'
};

type Row = Record<string, unknown>;

function quote(identifier: string): string {
	return `"${identifier.replaceAll('"', '""')}"`;
}

/**
 * Inserts `rows` in chunks; `columns` names every column to write and its type. `onConflict` is appended as is
 * (e.g. `ON CONFLICT (slug) DO NOTHING`) for reference rows that a second run must leave alone.
 */
export async function insertRows(
	db: Knex,
	table: string,
	columns: Record<string, ColumnType>,
	rows: readonly Row[],
	{ chunkSize = 5000, onConflict = '' }: { chunkSize?: number; onConflict?: string } = {}
): Promise<void> {
	const names = Object.keys(columns);
	const selectList = names.map((n) => (columns[n] === 'jsonb' ? `u.${quote(n)}::jsonb` : `u.${quote(n)}`)).join(', ');
	const arrays = names.map((n) => `?::${PG_ARRAY[columns[n]]}`).join(', ');
	const sql = `INSERT INTO ${quote(table)} (${names.map(quote).join(', ')}) SELECT ${selectList} FROM unnest(${arrays}) AS u(${names.map(quote).join(', ')}) ${onConflict}`;
	for (let start = 0; start < rows.length; start += chunkSize) {
		const chunk = rows.slice(start, start + chunkSize);
		// Each binding is a whole column; pg turns a JS array into a Postgres array literal.
		const bindings = names.map((n) =>
			chunk.map((row): Knex.Value => {
				const value = row[n] ?? null;
				return columns[n] === 'jsonb' && value !== null ? JSON.stringify(value) : (value as Knex.Value);
			})
		);
		await db.raw(sql, bindings as unknown as Knex.RawBinding[]);
	}
}

/**
 * Takes `count` ids from a table's sequence so rows can be inserted with known ids, and children can point at their
 * parents without relying on the order RETURNING happens to give.
 */
export async function reserveIds(db: Knex, table: string, count: number): Promise<number[]> {
	if (count === 0) return [];
	const { rows } = await db.raw<{ rows: { id: number }[] }>(
		`SELECT nextval(pg_get_serial_sequence(?, 'id'))::int AS id FROM generate_series(1, ?::int)`,
		[table, count]
	);
	return rows.map((r) => r.id).sort((a, b) => a - b);
}

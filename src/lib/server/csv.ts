// Writing CSV (RFC 4180: fields separated by commas, records ended by CRLF, a field with a quote, separator or line
// break quoted and its quotes doubled) that is safe to open in a spreadsheet. Reading is papaparse's job
// (src/lib/server/vehicle-import.ts).
//
// Formula injection (OWASP "CSV Injection"): a spreadsheet runs a cell that starts with = + - @ as a formula, so
// text a customer or a colleague typed could call out to the network or run commands on the machine that opens the
// export. Every *text* cell that starts with one of those, a tab, CR or LF (or the full-width forms of = + - @,
// which some spreadsheets also take) gets a leading apostrophe: the spreadsheet shows the text as typed and runs
// nothing. Numbers are written by us from numeric columns (never from text), so a negative number such as -12.5
// stays a number a spreadsheet can add up: only `number` values bypass the guard. Text cells that contain a
// semicolon are quoted too, so a spreadsheet that splits on semicolons (decimal-comma locales) cannot cut a cell
// into a new one that starts with `=`.

export type CsvValue = string | number | boolean | null | undefined;

const FORMULA_START = /^[=+\-@\t\r\n\uFF1D\uFF0B\uFF0D\uFF20]/;
const NEEDS_QUOTES = /[",;\r\n\t]|^\s|\s$/;

/** True when a spreadsheet could read this text as the start of a formula. */
export function startsLikeFormula(text: string): boolean {
	return FORMULA_START.test(text);
}

/**
 * Undoes the guard on text read back from one of our exports: `'=1+2` → `=1+2`. Only an apostrophe in front of a
 * formula character is removed, so ordinary text that starts with an apostrophe stays as it is.
 */
export function unguard(text: string): string {
	return text.startsWith("'") && startsLikeFormula(text.slice(1)) ? text.slice(1) : text;
}

/** One field, escaped and quoted as needed. */
export function csvCell(value: CsvValue): string {
	if (value === null || value === undefined) return '';
	if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
	if (typeof value === 'boolean') return value ? 'yes' : 'no';
	const text = startsLikeFormula(value) ? `'${value}` : value;
	return NEEDS_QUOTES.test(text) ? `"${text.replaceAll('"', '""')}"` : text;
}

/** One record, CRLF included. */
export function csvLine(values: readonly CsvValue[]): string {
	return values.map(csvCell).join(',') + '\r\n';
}

/**
 * A whole file: the header, then one record per row. Starts with a UTF-8 byte order mark, which Excel needs to read
 * the file as UTF-8 (our own import accepts it).
 */
export function toCsv(header: readonly string[], rows: Iterable<readonly CsvValue[]>, { bom = true } = {}): string {
	const parts = [bom ? '\uFEFF' : '', csvLine(header)];
	for (const row of rows) parts.push(csvLine(row));
	return parts.join('');
}

/** A CSV download: never cached (it may hold customer data), saved under `filename`. */
export function csvResponse(filename: string, body: string): Response {
	return new Response(body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8; header=present',
			'content-disposition': `attachment; filename="${filename.replace(/[^\w.-]/g, '_')}"`,
			'cache-control': 'no-store',
			'x-content-type-options': 'nosniff'
		}
	});
}

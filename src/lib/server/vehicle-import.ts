// Importing vehicle data from a CSV file in our own column format (README, "Vehicle data"): reading the upload,
// checking every row, the preview, and the import itself (the SQL is in ./db/vehicle-import.ts).
//
// The file: UTF-8 (a byte order mark is fine), CRLF or LF line ends, commas or semicolons between cells. The separator
// is read from the header line, not guessed by papaparse (a small file with decimal commas fools its guess). In a
// semicolon-separated file a decimal comma is read as a point. Blank lines and rows of empty cells are skipped. Every
// problem is reported with its line in the file (as a text editor counts them), its column and a reason.
//
// Preview → confirm: the confirm step uploads the same file again and everything is read and checked again; the
// preview's page keeps the chosen file in its form, so the manager clicks once more and nothing is kept on the server
// between the steps (no state to expire, nothing another instance lacks, nothing a forged id could point at). The
// confirm carries a token naming the file's SHA-256 and the counts the preview showed: a different file, or data that
// changed since (an edit, another import), writes nothing and shows a new preview instead.
import { createHash } from 'node:crypto';
import Papa from 'papaparse';
import {
	vehicleColumns,
	vehicleDataSchema,
	vehicleFieldInfo,
	vehicleKeyColumns,
	type VehicleColumn,
	type VehicleInput
} from '$lib/schemas/vehicles';
import { unguard } from './csv';
import type { Actor } from './db/actor';
import * as imports from './db/vehicle-import';

/** The largest file taken: about 60,000 rows. BODY_SIZE_LIMIT (scripts/config.mjs) must stay a little above it. */
export const MAX_IMPORT_BYTES = 10 * 1024 * 1024;
/** Problems listed in a preview; the count says how many more there are. */
export const MAX_LISTED_ISSUES = 1000;
/** Changed rows listed in a preview (all are counted, and each changed field is counted over all rows). */
export const MAX_LISTED_CHANGES = 500;

export interface ImportIssue {
	/** Line in the file, 1 = the header; 0 = the file as a whole. */
	line: number;
	/** The column's name in the header, or '' for the whole row or file. */
	column: string;
	reason: string;
}

export interface ReadResult {
	rows: imports.ImportRow[];
	issues: ImportIssue[];
	delimiter?: ',' | ';';
	/** Data rows in the file (blank ones not counted), good and bad. */
	rowCount: number;
}

const megabytes = (bytes: number) => `${Math.round(bytes / 1024 / 1024)} MB`;
const decimalColumns = new Set<string>([
	'bolt_circle_mm',
	'centre_bore_mm',
	'hex_mm',
	'torque_nm',
	'placard_front_kpa',
	'placard_rear_kpa'
]);

/** Offsets where each line starts (CRLF, LF or a lone CR ends a line). */
function lineStarts(text: string): number[] {
	const starts = [0];
	for (let i = 0; i < text.length; i++) {
		const c = text.charCodeAt(i);
		if (c === 10) starts.push(i + 1);
		else if (c === 13) {
			if (text.charCodeAt(i + 1) === 10) i++;
			starts.push(i + 1);
		}
	}
	return starts;
}

function lineAt(starts: number[], offset: number): number {
	let lo = 0;
	let hi = starts.length - 1;
	while (lo < hi) {
		const mid = (lo + hi + 1) >> 1;
		if (starts[mid] <= offset) lo = mid;
		else hi = mid - 1;
	}
	return lo + 1;
}

/** The separator the header line uses: the more frequent of comma and semicolon outside quotes. */
function headerDelimiter(text: string): ',' | ';' | undefined {
	let commas = 0;
	let semicolons = 0;
	let quoted = false;
	for (let i = 0; i < text.length; i++) {
		const c = text[i];
		if (c === '"') quoted = !quoted;
		else if (!quoted && (c === '\n' || c === '\r')) break;
		else if (!quoted && c === ',') commas++;
		else if (!quoted && c === ';') semicolons++;
	}
	if (commas === 0 && semicolons === 0) return undefined;
	return semicolons > commas ? ';' : ',';
}

function decode(bytes: Uint8Array): { text: string } | { issue: ImportIssue } {
	try {
		return { text: new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(bytes) };
	} catch {
		const loose = new TextDecoder('utf-8').decode(bytes);
		const line = lineAt(lineStarts(loose), loose.indexOf('\uFFFD'));
		return {
			issue: {
				line,
				column: '',
				reason:
					'The file is not UTF-8 text (this line has a character in another encoding). In the spreadsheet, save it as "CSV UTF-8".'
			}
		};
	}
}

function unknownColumn(name: string): string {
	const stem = name.split('_')[0];
	const near = vehicleColumns.find((c) => c.split('_')[0] === stem && stem.length > 2);
	const unit = near && vehicleFieldInfo[near].unit;
	const hint = near ? ` Did you mean ${near}${unit ? ` (in ${unit})` : ''}?` : '';
	return `Unknown column "${name}".${hint} The columns are ${vehicleColumns.join(', ')}.`;
}

/** Header problems, or the position of each column. */
function readHeader(cells: string[]): { issues: ImportIssue[]; index: Map<VehicleColumn, number> } {
	const issues: ImportIssue[] = [];
	const index = new Map<VehicleColumn, number>();
	cells.forEach((cell, i) => {
		const name = cell.trim().toLowerCase();
		if (name === '') {
			if (cells.slice(i).every((c) => c.trim() === '')) return; // trailing empty cells from a spreadsheet
			issues.push({ line: 1, column: `column ${i + 1}`, reason: `Column ${i + 1} of the header has no name.` });
		} else if (!(vehicleColumns as readonly string[]).includes(name)) {
			issues.push({ line: 1, column: name, reason: unknownColumn(name) });
		} else if (index.has(name as VehicleColumn)) {
			issues.push({ line: 1, column: name, reason: `Column "${name}" appears twice in the header.` });
		} else index.set(name as VehicleColumn, i);
	});
	for (const column of vehicleColumns) {
		if (!index.has(column))
			issues.push({
				line: 1,
				column,
				reason: `Column "${column}" is missing from the header (${vehicleFieldInfo[column].label}${
					vehicleFieldInfo[column].unit ? `, ${vehicleFieldInfo[column].unit}` : ''
				}). Every column must be there; cells may be blank where the format allows it.`
			});
	}
	return { issues, index };
}

const quoteProblem: Record<string, string> = {
	MissingQuotes: 'A quoted cell is not closed: check the double quotes from this line on.',
	InvalidQuotes: 'A double quote inside a quoted cell must be written twice ("").'
};

/** Reads and checks a whole file; nothing is written. */
export function readVehicleCsv(bytes: Uint8Array): ReadResult {
	const result: ReadResult = { rows: [], issues: [], rowCount: 0 };
	if (bytes.length > MAX_IMPORT_BYTES) {
		result.issues.push({
			line: 0,
			column: '',
			reason: `The file is larger than ${megabytes(MAX_IMPORT_BYTES)}: split it into smaller files and import each.`
		});
		return result;
	}
	const decoded = decode(bytes);
	if ('issue' in decoded) {
		result.issues.push(decoded.issue);
		return result;
	}
	const text = decoded.text.replace(/^\uFEFF/, '');
	const delimiter = headerDelimiter(text);
	if (!delimiter) {
		result.issues.push({
			line: 1,
			column: '',
			reason: `The first line must be the header: the column names separated by commas or semicolons (${vehicleColumns
				.slice(0, 4)
				.join(',')},…).`
		});
		return result;
	}
	result.delimiter = delimiter;

	const starts = lineStarts(text);
	const firstLine = new Map<string, number>();
	let header: ReturnType<typeof readHeader> | undefined;
	let previousEnd = 0;

	Papa.parse<string[]>(text, {
		delimiter,
		skipEmptyLines: true,
		step(step, parser) {
			// papaparse reports where each row ends; it starts after the previous one and any blank lines it skipped.
			let start = previousEnd;
			while (start < text.length && (text[start] === '\n' || text[start] === '\r')) start++;
			previousEnd = step.meta.cursor;
			const line = lineAt(starts, start);
			const cells = step.data;

			if (!header) {
				header = readHeader(cells);
				result.issues.push(...header.issues);
				// Row problems under a broken header would only repeat it.
				if (header.issues.length) parser.abort();
				return;
			}
			if (cells.every((c) => c.trim() === '')) return;
			result.rowCount++;
			if (step.errors.length) {
				for (const e of step.errors)
					result.issues.push({ line, column: '', reason: quoteProblem[e.code] ?? `${e.message}.` });
				return;
			}
			const width = header.index.size;
			const filled = cells.length - [...cells].reverse().findIndex((c) => c.trim() !== '');
			if (cells.length < width || filled > width) {
				const separator = delimiter === ',' ? 'comma' : 'semicolon';
				result.issues.push({
					line,
					column: '',
					reason: `This row has ${cells.length} cells and the header ${width}: a cell whose text holds a ${separator} must be in double quotes.`
				});
				return;
			}
			const input = {} as VehicleInput;
			for (const [column, i] of header.index) {
				let value = unguard(cells[i]);
				if (delimiter === ';' && decimalColumns.has(column) && /^\s*\d+,\d+\s*$/.test(value))
					value = value.replace(',', '.');
				input[column] = value;
			}
			const parsed = vehicleDataSchema.safeParse(input);
			if (!parsed.success) {
				for (const issue of parsed.error.issues)
					result.issues.push({ line, column: String(issue.path[0] ?? ''), reason: issue.message });
				return;
			}
			const key = JSON.stringify(vehicleKeyColumns.map((c) => parsed.data[c]));
			const earlier = firstLine.get(key);
			if (earlier !== undefined) {
				result.issues.push({
					line,
					column: 'make',
					reason: `Same make, model, trim and years as line ${earlier}: each vehicle may appear once in a file.`
				});
				return;
			}
			firstLine.set(key, line);
			result.rows.push({ line, data: parsed.data });
		}
	});

	if (!header) result.issues.push({ line: 1, column: '', reason: 'The file is empty: it needs the header line.' });
	else if (!header.issues.length && result.rowCount === 0)
		result.issues.push({ line: 2, column: '', reason: 'The file has no vehicle rows below the header.' });
	return result;
}

// ---------------------------------------------------------------- the preview and the import

export interface Upload {
	name: string;
	bytes: Uint8Array;
}

export interface ListedChange {
	line: number;
	id: number;
	label: string;
	fields: imports.PlannedChange['fields'];
}

export interface Preview extends imports.Counts {
	fileName: string;
	bytes: number;
	delimiter: ',' | ';' | null;
	rowCount: number;
	issueCount: number;
	/** The first MAX_LISTED_ISSUES problems, by line. */
	issues: ImportIssue[];
	/** How many changed rows change each field. */
	changedFields: Partial<Record<VehicleColumn, number>>;
	/** The first MAX_LISTED_CHANGES changed rows. */
	changes: ListedChange[];
	/** Sent back to confirm; empty when there is nothing to import or a problem to fix first. */
	token: string;
}

const labelOf = (v: { make: string; model: string; trim: string; year_from: number; year_to: number }) =>
	[`${v.year_from}–${v.year_to}`, v.make, v.model, v.trim].filter(Boolean).join(' ');

const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');
const tokenOf = (hash: string, c: imports.Counts) => `${hash}.${c.added}.${c.changed}.${c.unchanged}`;

function previewOf(upload: Upload, read: ReadResult, plan: imports.Plan): Preview {
	const counts = imports.countsOf(plan);
	const changedFields: Preview['changedFields'] = {};
	for (const change of plan.changed)
		for (const f of change.fields) changedFields[f.column] = (changedFields[f.column] ?? 0) + 1;
	const issues = [...read.issues].sort((a, b) => a.line - b.line);
	const importable = issues.length === 0 && counts.added + counts.changed > 0;
	return {
		fileName: upload.name,
		bytes: upload.bytes.length,
		delimiter: read.delimiter ?? null,
		rowCount: read.rowCount,
		...counts,
		issueCount: issues.length,
		issues: issues.slice(0, MAX_LISTED_ISSUES),
		changedFields,
		changes: plan.changed.slice(0, MAX_LISTED_CHANGES).map((c) => ({
			line: c.row.line,
			id: c.id,
			label: labelOf(c.row.data),
			fields: c.fields
		})),
		token: importable ? tokenOf(sha256(upload.bytes), counts) : ''
	};
}

/** Reads and checks the file and says what importing it would do (for its good rows, even when some are bad). */
export async function preview(upload: Upload): Promise<Preview> {
	const read = readVehicleCsv(upload.bytes);
	const plan = read.rows.length ? await imports.plan(read.rows) : { added: [], changed: [], unchanged: 0 };
	return previewOf(upload, read, plan);
}

export type ImportResult =
	| { ok: true; outcome: imports.ImportOutcome; fileName: string }
	| { ok: false; status: 400 | 409 | 422; message: string; preview?: Preview };

/**
 * Imports the file the manager confirmed: read and checked again, then written in one transaction. Nothing is written
 * when any row is bad, when the file is not the one previewed, or when the preview is out of date.
 */
export async function commit(actor: Actor, upload: Upload, token: string): Promise<ImportResult> {
	const read = readVehicleCsv(upload.bytes);
	const [hash, ...numbers] = token.split('.');
	const expected = numbers.map(Number);
	if (read.issues.length) {
		const plan = read.rows.length ? await imports.plan(read.rows) : { added: [], changed: [], unchanged: 0 };
		return {
			ok: false,
			status: 400,
			message: `Nothing was imported: the file has ${read.issues.length === 1 ? 'a problem' : `${read.issues.length} problems`} to fix first.`,
			preview: previewOf(upload, read, plan)
		};
	}
	const fresh = async (message: string, plan?: imports.Plan): Promise<ImportResult> => ({
		ok: false,
		status: 409,
		message,
		preview: previewOf(upload, read, plan ?? (await imports.plan(read.rows)))
	});
	if (hash !== sha256(upload.bytes) || expected.length !== 3 || expected.some((n) => !Number.isInteger(n)))
		return fresh(
			'Nothing was imported: this is not the file you previewed (or it changed since). Here is its preview; check it and confirm again.'
		);
	try {
		const outcome = await imports.apply(
			actor,
			read.rows,
			{ added: expected[0], changed: expected[1], unchanged: expected[2] },
			{ fileName: upload.name, sha256: hash }
		);
		return { ok: true, outcome, fileName: upload.name };
	} catch (e) {
		if (e instanceof imports.StalePlan)
			return fresh(
				'Nothing was imported: the vehicle data changed since your preview (an edit or another import). Here is the new preview; check it and confirm again.',
				e.plan
			);
		// A row the checks passed but a database constraint refused (a bug in the checks): the transaction rolled back.
		const code = (e as { code?: string }).code;
		if (code && code.startsWith('23'))
			return {
				ok: false,
				status: 422,
				message: `Nothing was imported: the database refused a row (${(e as { constraint?: string }).constraint ?? code}). Tell whoever looks after Lugline; the file is fine to keep.`
			};
		throw e;
	}
}

/** Why an upload cannot be read: the status and a message for the manager. */
export interface UploadProblem {
	status: 400 | 413 | 415;
	message: string;
}

/** Room for the multipart framing and the other fields around the file. */
const FORM_OVERHEAD_BYTES = 64 * 1024;
const tooLarge = (): UploadProblem => ({
	status: 413,
	message: `The file is too large: at most ${megabytes(MAX_IMPORT_BYTES)}. Split it into smaller files and import each.`
});

/** The uploaded CSV file (form field `file`) and the other fields of the form, or why it cannot be read. */
export async function readUpload(
	request: Request
): Promise<{ upload: Upload; form: FormData } | { problem: UploadProblem }> {
	const type = request.headers.get('content-type') ?? '';
	if (!/^multipart\/form-data\s*;/i.test(type))
		return {
			problem: { status: 415, message: 'Send the file from the form (multipart/form-data, a field named "file").' }
		};
	const declared = Number(request.headers.get('content-length'));
	if (Number.isFinite(declared) && declared > MAX_IMPORT_BYTES + FORM_OVERHEAD_BYTES) return { problem: tooLarge() };
	let form: FormData;
	try {
		form = await request.formData();
	} catch (e) {
		// adapter-node stops reading at BODY_SIZE_LIMIT with a 413 error of its own.
		const status = (e as { status?: number })?.status ?? (e as { cause?: { status?: number } })?.cause?.status;
		if (status === 413 || /BODY_SIZE_LIMIT|exceeds limit/i.test(String(e))) return { problem: tooLarge() };
		return { problem: { status: 400, message: 'The upload could not be read. Choose the file again and retry.' } };
	}
	const file = form.get('file');
	if (file === null || typeof file === 'string' || (file.size === 0 && file.name === ''))
		return { problem: { status: 400, message: 'Choose a CSV file first.' } };
	if (file.size === 0) return { problem: { status: 400, message: `${file.name} is empty (0 bytes).` } };
	if (file.size > MAX_IMPORT_BYTES) return { problem: tooLarge() };
	return { upload: { name: file.name.slice(0, 200), bytes: new Uint8Array(await file.arrayBuffer()) }, form };
}

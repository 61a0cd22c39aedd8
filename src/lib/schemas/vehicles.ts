// The vehicle data as screens receive it (the palette's compact entries and one record's wheel facts, SI units), and
// as managers edit and import it: one schema for the edit form and for each row of a CSV file.
import { z } from 'zod';
import { STUD_COUNT_RANGE } from '$lib/calc/torque';
import { parseTireSize } from '$lib/calc/tire-size';

export interface VehicleEntry {
	id: number;
	label: string;
	sizes: string[];
}

/** One vehicle's wheel facts, stored in SI; screens show them in the store's units. */
export interface VehicleFacts {
	id: number;
	yearFrom: number;
	yearTo: number;
	make: string;
	model: string;
	trim: string;
	studCount: number;
	boltCircleMm: number;
	centreBoreMm: number;
	thread: string;
	hexMm: number;
	torqueNm: number;
	tireFront: string;
	tireRear: string;
	placardFrontKpa: number;
	placardRearKpa: number;
	tpms: string;
	notes: string;
	source: string;
}

// ---------------------------------------------------------------- editing and importing

export const tpmsTypes = ['direct', 'indirect', 'none'] as const;
export type TpmsType = (typeof tpmsTypes)[number];

/**
 * The vehicle data's fields, in order: the columns of our CSV format (README, "Vehicle data"), the edit form's field
 * names and the `vehicles` table's columns are all the same names. Units are SI and written into the name.
 */
export const vehicleColumns = [
	'make',
	'model',
	'trim',
	'year_from',
	'year_to',
	'stud_count',
	'bolt_circle_mm',
	'centre_bore_mm',
	'thread',
	'hex_mm',
	'torque_nm',
	'tire_front',
	'tire_rear',
	'placard_front_kpa',
	'placard_rear_kpa',
	'tpms',
	'notes',
	'source'
] as const;
export type VehicleColumn = (typeof vehicleColumns)[number];

/** The columns that identify a record: an import updates the record with the same five values, or adds one. */
export const vehicleKeyColumns = ['make', 'model', 'trim', 'year_from', 'year_to'] as const;

export const NAME_MAX = 60;
export const VEHICLE_NOTES_MAX = 2000;
export const SOURCE_MAX = 300;
export const YEAR_MIN = 1900;
/** Next year's models are on sale from the summer before; two years ahead leaves room and still catches typos. */
export const yearMax = () => new Date().getFullYear() + 2;

/** What a person sees for each field (the form's labels, the import page's column table, the messages). */
export const vehicleFieldInfo: Record<VehicleColumn, { label: string; unit?: string; example: string }> = {
	make: { label: 'Make', example: 'Corvane' },
	model: { label: 'Model', example: 'Tessa' },
	trim: { label: 'Trim', example: 'GL (blank for none)' },
	year_from: { label: 'First model year', example: '2016' },
	year_to: { label: 'Last model year', example: '2021' },
	stud_count: { label: 'Stud count', example: '5' },
	bolt_circle_mm: { label: 'Bolt circle', unit: 'mm', example: '114.3' },
	centre_bore_mm: { label: 'Centre bore', unit: 'mm', example: '64.1' },
	thread: { label: 'Thread', example: 'M12x1.5, M14x1.25, 1/2-20 or 7/16-20' },
	hex_mm: { label: 'Hex size', unit: 'mm', example: '19' },
	torque_nm: { label: 'Torque', unit: 'N·m', example: '110' },
	tire_front: { label: 'OE size front', example: '215/55R17 94V' },
	tire_rear: { label: 'OE size rear', example: '215/55R17 94V' },
	placard_front_kpa: { label: 'Placard pressure front', unit: 'kPa', example: '230' },
	placard_rear_kpa: { label: 'Placard pressure rear', unit: 'kPa', example: '220' },
	tpms: { label: 'TPMS type', example: 'direct, indirect or none' },
	notes: { label: 'Notes', example: 'Locking lug nut on most cars' },
	source: { label: 'Source', example: 'Service manual 2019, p. 14' }
};

const shown = (text: string) => (text.length > 40 ? `"${text.slice(0, 40)}…"` : `"${text}"`);

/** A plain decimal: digits with an optional point and more digits. No signs, exponents or thousands separators. */
const DECIMAL = /^\d{1,7}(?:\.\d+)?$/;

/**
 * Rounds a plain decimal string to `places` digits, half away from zero, on the digits themselves (binary doubles
 * round 1.005 down): exactly what PostgreSQL's NUMERIC(p, places) stores, so a value read back compares equal.
 */
export function roundDecimal(text: string, places: number): number {
	const [whole, fraction = ''] = text.split('.');
	if (fraction.length <= places) return Number(text);
	const up = fraction.charCodeAt(places) >= 53; // '5'
	const scaled = (BigInt(whole + fraction.slice(0, places)) + (up ? 1n : 0n)).toString().padStart(places + 1, '0');
	return Number(places ? `${scaled.slice(0, -places)}.${scaled.slice(-places)}` : scaled);
}

type Ctx = z.core.$RefinementCtx<string>;
const problem = (ctx: Ctx, input: string, message: string) => {
	ctx.issues.push({ code: 'custom', message, input });
	return z.NEVER;
};

interface Measure {
	column: VehicleColumn;
	min: number;
	max: number;
	/** Decimal places the column stores; more are rounded. */
	places: number;
	/** A hint for a value out of range that is probably in another unit (inches, psi, bar). */
	otherUnit?: (value: number) => string | undefined;
}

function measure({ column, min, max, places, otherUnit }: Measure) {
	const { label, unit, example } = vehicleFieldInfo[column];
	return z.string({ error: `${label} is missing: enter it in ${unit}, e.g. ${example}` }).transform((raw, ctx) => {
		const text = raw.trim();
		if (text === '') return problem(ctx, raw, `${label} is missing: enter it in ${unit}, e.g. ${example}`);
		if (!DECIMAL.test(text)) {
			const fraction = /^(\d+)\/(\d+)$/.exec(text);
			const inches = fraction && Number(fraction[2]) > 0 ? Number(fraction[1]) / Number(fraction[2]) : undefined;
			const hint =
				inches !== undefined
					? ` If that is ${text} in, it is ${(inches * 25.4).toFixed(2)} ${unit}.`
					: /^\d+\s*[x×]\s*[\d.]+$/i.test(text)
						? ' Write the stud count and the bolt circle in their own fields.'
						: /^\d+,\d+$/.test(text)
							? ' Use a point for decimals (or a semicolon-separated file, where a decimal comma is read).'
							: '';
			return problem(ctx, raw, `${label} must be a number in ${unit}, e.g. ${example}; got ${shown(text)}.${hint}`);
		}
		const value = roundDecimal(text, places);
		if (value < min || value > max) {
			const hint = otherUnit?.(value);
			return problem(ctx, raw, `${label} must be from ${min} to ${max} ${unit}; got ${text}.${hint ? ` ${hint}` : ''}`);
		}
		return value;
	});
}

const inchesHint = (min: number, max: number) => (value: number) => {
	const mm = Math.round(value * 25.4 * 100) / 100;
	return value < min && mm >= min && mm <= max ? `If that is in inches, it is ${mm} mm.` : undefined;
};

const pressureHint = (value: number) => {
	if (value >= 100) return undefined;
	if (value < 10) return `If that is bar, it is ${Math.round(value * 1000) / 10} kPa.`;
	// 1 psi = 6.894757 kPa (NIST SP 811).
	return `If that is psi, it is ${Math.round(value * 68.94757) / 10} kPa.`;
};

function wholeNumber(column: VehicleColumn, min: number, max: () => number, what: string) {
	const { label, example } = vehicleFieldInfo[column];
	return z.string({ error: `${label} is missing: enter ${what}, e.g. ${example}` }).transform((raw, ctx) => {
		const text = raw.trim();
		if (text === '') return problem(ctx, raw, `${label} is missing: enter ${what}, e.g. ${example}`);
		const value = /^\d{1,6}$/.test(text) ? Number(text) : NaN;
		if (!(value >= min && value <= max())) {
			const pattern = /^(\d+)\s*[x×]\s*([\d.]+)$/i.exec(text);
			const hint = pattern ? ` Write ${pattern[1]} here and the bolt circle (${pattern[2]}) in its own field.` : '';
			return problem(ctx, raw, `${label} must be ${what} from ${min} to ${max()}; got ${shown(text)}.${hint}`);
		}
		return value;
	});
}

/** Text without control characters; spaces around (and, for names, doubled inside) are dropped. */
function text(column: VehicleColumn, max: number, { required = false, oneLine = true } = {}) {
	const { label, example } = vehicleFieldInfo[column];
	return z.string({ error: `${label} is missing` }).transform((raw, ctx) => {
		const value = oneLine ? raw.trim().replace(/\s+/g, ' ') : raw.trim();
		if (required && value === '') return problem(ctx, raw, `${label} is missing: enter it, e.g. ${example}`);
		if (value.length > max) return problem(ctx, raw, `${label} is too long: at most ${max} characters`);
		if (/[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/.test(value))
			return problem(ctx, raw, `${label} contains a control character; retype it as plain text`);
		return value;
	});
}

const METRIC_THREAD = /^M(\d{1,2})X(\d(?:\.\d{1,2})?)$/;
const INCH_THREAD = /^(\d{1,2})\/(\d{1,2})"?-(\d{1,2})(?:UNF|UNC|UNEF)?$/;

/**
 * A stud or bolt thread in one spelling: metric `M<diameter mm>x<pitch mm>` (M12x1.5, M14x2.0) or inch
 * `<diameter in>-<threads per inch>` (1/2-20, 9/16-18), checked for sizes a wheel uses.
 */
export function normaliseThread(raw: string): string | undefined {
	const s = raw.toUpperCase().replace(/\s+/g, '').replace(',', '.');
	const metric = METRIC_THREAD.exec(s);
	if (metric) {
		const diameter = Number(metric[1]);
		const pitch = Number(metric[2]);
		if (diameter < 8 || diameter > 24 || pitch < 1 || pitch > 3) return undefined;
		return `M${diameter}x${Number.isInteger(pitch) ? pitch.toFixed(1) : String(pitch)}`;
	}
	const inch = INCH_THREAD.exec(s);
	if (inch) {
		const [n, d, tpi] = [Number(inch[1]), Number(inch[2]), Number(inch[3])];
		const reduced = [2, 4, 8, 16].includes(d) && n % 2 === 1;
		if (!reduced || n / d < 5 / 16 || n / d > 1 || tpi < 8 || tpi > 32) return undefined;
		return `${n}/${d}-${tpi}`;
	}
	return undefined;
}

const thread = z.string({ error: 'Thread is missing: write it like M12x1.5 or 1/2-20' }).transform((raw, ctx) => {
	const text = raw.trim();
	if (text === '') return problem(ctx, raw, 'Thread is missing: write it like M12x1.5, M14x1.25, 1/2-20 or 7/16-20');
	return (
		normaliseThread(text) ??
		problem(
			ctx,
			raw,
			`Thread ${shown(text)} is not one we read: write metric diameter x pitch in mm (M12x1.5, M14x1.25) or inch diameter-threads per inch (1/2-20, 7/16-20)`
		)
	);
});

function tireSize(column: 'tire_front' | 'tire_rear') {
	const { label } = vehicleFieldInfo[column];
	return z.string({ error: `${label} is missing` }).transform((raw, ctx) => {
		try {
			return parseTireSize(raw.trim()).text;
		} catch (e) {
			return problem(ctx, raw, `${label}: ${e instanceof Error ? e.message : String(e)}`);
		}
	});
}

const tpms = z.string({ error: 'TPMS type is missing: direct, indirect or none' }).transform((raw, ctx) => {
	const value = raw.trim().toLowerCase();
	return (tpmsTypes as readonly string[]).includes(value)
		? (value as TpmsType)
		: problem(
				ctx,
				raw,
				`TPMS type must be direct, indirect or none (none when the car has no pressure monitoring); got ${shown(raw.trim())}`
			);
});

const yearFields = new Set<PropertyKey>(['year_from', 'year_to']);

/**
 * One vehicle record as a person enters it: every field as text (a form field or a CSV cell), read, checked and
 * normalised (thread and tire sizes to one spelling, decimals rounded to what the column stores). Every message says
 * what to enter and in which unit.
 */
export const vehicleDataSchema = z
	.object({
		make: text('make', NAME_MAX, { required: true }),
		model: text('model', NAME_MAX, { required: true }),
		trim: text('trim', NAME_MAX),
		year_from: wholeNumber('year_from', YEAR_MIN, yearMax, 'a 4-digit year'),
		year_to: wholeNumber('year_to', YEAR_MIN, yearMax, 'a 4-digit year'),
		stud_count: wholeNumber(
			'stud_count',
			STUD_COUNT_RANGE.min,
			() => STUD_COUNT_RANGE.max,
			'the number of studs or bolts'
		),
		bolt_circle_mm: measure({ column: 'bolt_circle_mm', min: 50, max: 300, places: 2, otherUnit: inchesHint(50, 300) }),
		centre_bore_mm: measure({ column: 'centre_bore_mm', min: 30, max: 220, places: 2, otherUnit: inchesHint(30, 220) }),
		thread,
		hex_mm: measure({ column: 'hex_mm', min: 10, max: 50, places: 2, otherUnit: inchesHint(10, 50) }),
		torque_nm: measure({ column: 'torque_nm', min: 20, max: 1000, places: 1 }),
		tire_front: tireSize('tire_front'),
		tire_rear: tireSize('tire_rear'),
		placard_front_kpa: measure({
			column: 'placard_front_kpa',
			min: 100,
			max: 1000,
			places: 1,
			otherUnit: pressureHint
		}),
		placard_rear_kpa: measure({ column: 'placard_rear_kpa', min: 100, max: 1000, places: 1, otherUnit: pressureHint }),
		tpms,
		notes: text('notes', VEHICLE_NOTES_MAX, { oneLine: false }),
		source: text('source', SOURCE_MAX)
	})
	.refine((v) => v.year_from <= v.year_to, {
		path: ['year_to'],
		message: 'The last model year is before the first: check both years (or swap them)',
		// Checked whenever both years read well, so a row shows this alongside its other problems.
		when: (payload) => !payload.issues.some((i) => yearFields.has(i.path?.[0] ?? ''))
	});

export type VehicleData = z.output<typeof vehicleDataSchema>;
/** What a form or a CSV row gives the schema: every field as text. */
export type VehicleInput = Record<VehicleColumn, string>;

/** A record as the manager's pages show it: the data, plus what identifies this version of it. */
export interface VehicleRecord extends VehicleData {
	id: number;
	version: number;
	updatedAt: string;
}

/** The first message for each field, for a form to show beside it. */
export function fieldErrors(error: z.ZodError): Partial<Record<VehicleColumn, string>> {
	const errors: Partial<Record<VehicleColumn, string>> = {};
	for (const issue of error.issues) {
		const field = String(issue.path[0] ?? '') as VehicleColumn;
		errors[field] ??= issue.message;
	}
	return errors;
}

/** The query of the manager's vehicle list: search words (a 4-digit word is a model year) and a page. */
export const vehicleSearchSchema = z.object({
	q: z.string().trim().max(100, 'Search for at most 100 characters').catch(''),
	page: z.coerce.number().int().min(1).max(100_000).catch(1)
});

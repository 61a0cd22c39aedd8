/**
 * Tire size designations: reading what a writer types or reads off a sidewall, and the nominal geometry that follows
 * from it (section height, overall diameter, circumference, revolutions per km and per mile, and what a size change
 * does to the speedometer).
 *
 * Sources: the textbook size formulas (section height = width × aspect ratio / 100, overall diameter = rim + 2 × section
 * height), size designations as explained in owner's-manual size charts (P = passenger, no prefix = European metric,
 * LT = light truck, T = temporary spare, flotation `31x10.50R15LT` = overall diameter × section width, rim, all in
 * inches). See shared/reference/check-values.md §1–2. These are nominal design dimensions: real tires differ, and
 * published revolutions per mile are measured under load.
 */

import { speedSymbolToKmh } from './load-speed';

export type TirePrefix = '' | 'P' | 'LT' | 'T' | 'ST';
export type Construction = 'R' | 'D' | 'B';

export interface TireSize {
	prefix: TirePrefix;
	widthMm: number;
	/** Section height as a percentage of section width; implied from the inch dimensions for flotation sizes. */
	aspectRatio: number;
	construction: Construction;
	rimIn: number;
	/** Single-fitment load index. */
	loadIndex?: number;
	/** Dual-fitment load index of an LT or C marking such as 123/120 (the second number). */
	loadIndexDual?: number;
	speedSymbol?: string;
	flotation: boolean;
	/** Canonical form, e.g. `P225/60R16 97H` or `33x12.50R15LT 109Q`. */
	text: string;
	/** Flotation sizes only: the overall diameter in inches as marked. */
	overallDiameterIn?: number;
	/** Marked ZR: rated above 240 km/h even without a service description. */
	zr?: boolean;
	/** European commercial (C) marking, e.g. `195/70R15C 104/102R`. */
	commercial?: boolean;
	/** Marked XL (extra load). */
	extraLoad?: boolean;
	/** Service description in brackets, e.g. `(99Y)`: rated above the symbol's speed; the tire maker sets the limit. */
	speedAbove?: boolean;
}

const INCH_MM = 25.4;
const MILE_MM = 1_609_344;

const SERVICE = String.raw`(\()?(\d{2,3})(?:\/(\d{2,3}))?([A-Z]\d?)?(\))?`;
const METRIC = new RegExp(
	String.raw`^(P|LT|ST|T)?(\d{3})\/?(\d{2})(ZR|R|D|B)?(\d{2}(?:\.5)?)(LT|C)?(?:${SERVICE})?(XL)?$`
);
const FLOTATION = new RegExp(
	String.raw`^(LT)?(\d{2}(?:\.\d{1,2})?)X(\d{1,2}(?:\.\d{1,2})?)(ZR|R|D|B|-)(\d{2}(?:\.5)?)(LT)?(?:${SERVICE})?(XL)?$`
);

const EXAMPLES = '225/60R16, P225/60R16 97H, LT265/75R16 123/120S, 33x12.50R15LT or 2256016';

function checkRange(value: number, min: number, max: number, what: string) {
	if (!(value >= min && value <= max)) throw new RangeError(`${what} must be between ${min} and ${max}, got ${value}`);
}

interface Service {
	loadIndex?: number;
	loadIndexDual?: number;
	speedSymbol?: string;
	speedAbove?: boolean;
}

function readService(
	open: string | undefined,
	li: string | undefined,
	dual: string | undefined,
	speed: string | undefined,
	close: string | undefined
): Service {
	if (li === undefined) return {};
	if (Boolean(open) !== Boolean(close)) {
		throw new RangeError('A bracket in the service description is not closed: write it like (99Y) or 99Y');
	}
	const service: Service = { loadIndex: Number(li) };
	if (dual !== undefined) {
		service.loadIndexDual = Number(dual);
		// Dual fitment shares the load between two tires, so its per-tire index is always the lower one.
		if (service.loadIndexDual >= service.loadIndex!) {
			throw new RangeError(
				`In a dual marking the second (dual) index is lower than the first: ${li}/${dual} looks swapped or misread`
			);
		}
	}
	if (speed !== undefined) {
		speedSymbolToKmh(speed); // throws a message naming the known symbols
		service.speedSymbol = speed;
	}
	if (open) {
		if (speed === undefined)
			throw new RangeError('Brackets around a service description need a speed symbol, e.g. (99Y)');
		service.speedAbove = true;
	}
	return service;
}

function formatService(size: Omit<TireSize, 'text'>): string {
	if (size.loadIndex === undefined) return '';
	const body = `${size.loadIndex}${size.loadIndexDual !== undefined ? `/${size.loadIndexDual}` : ''}${size.speedSymbol ?? ''}`;
	return ` ${size.speedAbove ? `(${body})` : body}`;
}

/** The canonical written form of a size, as stored in `text`. */
export function formatTireSize(size: Omit<TireSize, 'text'>): string {
	const construction = size.zr ? 'ZR' : size.construction;
	const service = formatService(size) + (size.extraLoad ? ' XL' : '');
	if (size.flotation) {
		const d = size.overallDiameterIn ?? size.rimIn + (2 * size.widthMm * size.aspectRatio) / 100 / INCH_MM;
		const wIn = size.widthMm / INCH_MM;
		const w = Number.isInteger(wIn) ? String(wIn) : wIn.toFixed(2);
		return `${String(d)}x${w}${construction}${String(size.rimIn)}${size.prefix}${service}`;
	}
	return `${size.prefix}${size.widthMm}/${size.aspectRatio}${construction}${String(size.rimIn)}${size.commercial ? 'C' : ''}${service}`;
}

/**
 * Reads a tire size in any case, with or without spaces: metric and P-metric (`P225/60R16 97H`), LT with a dual load
 * index (`LT265/75R16 123/120S`), temporary spares (`T125/70D16`), ZR (`245/40ZR18 97Y`), bracketed service
 * descriptions (`(99Y)`), C and XL markings, flotation (`31X10.50R15LT 109Q`) and the bare seven digits a writer
 * types fast (`2256016` → 225/60R16, radial assumed).
 */
export function parseTireSize(text: string): TireSize {
	const s = text.toUpperCase().replace(/\s+/g, '');
	if (s === '') throw new RangeError(`Enter a tire size, e.g. ${EXAMPLES}`);

	const m = METRIC.exec(s);
	if (m) {
		const [, pre, w, ar, cons, rim, suffix, open, li, dual, speed, close, xl] = m;
		if (pre && suffix === 'LT' && pre !== 'LT') {
			throw new RangeError(`"${text}" carries both ${pre} and LT: a size is one or the other`);
		}
		const prefix = (suffix === 'LT' ? 'LT' : (pre ?? '')) as TirePrefix;
		const size: Omit<TireSize, 'text'> = {
			prefix,
			widthMm: Number(w),
			aspectRatio: Number(ar),
			construction: cons === 'D' || cons === 'B' ? cons : 'R',
			rimIn: Number(rim),
			flotation: false,
			...readService(open, li, dual, speed, close)
		};
		checkRange(size.widthMm, 100, 455, 'Section width (mm)');
		checkRange(size.aspectRatio, 20, 95, 'Aspect ratio');
		checkRange(size.rimIn, 8, 30, 'Rim diameter (in)');
		if (cons === 'ZR') size.zr = true;
		if (suffix === 'C') size.commercial = true;
		if (xl) size.extraLoad = true;
		return { ...size, text: formatTireSize(size) };
	}

	const f = FLOTATION.exec(s);
	if (f) {
		const [, pre, d, w, cons, rim, suffix, open, li, dual, speed, close, xl] = f;
		const diameterIn = Number(d);
		const widthIn = Number(w);
		const rimIn = Number(rim);
		checkRange(diameterIn, 20, 60, 'Overall diameter (in)');
		checkRange(widthIn, 5, 25, 'Section width (in)');
		checkRange(rimIn, 8, 30, 'Rim diameter (in)');
		if (diameterIn <= rimIn) {
			throw new RangeError(
				`Overall diameter ${diameterIn} in must be larger than the rim (${rimIn} in): check the order`
			);
		}
		const aspectRatio = ((diameterIn - rimIn) / 2 / widthIn) * 100;
		if (aspectRatio < 20 || aspectRatio > 95) {
			throw new RangeError(
				`${diameterIn}x${widthIn} on a ${rimIn} in rim implies an aspect ratio of ${aspectRatio.toFixed(0)} %, outside 20–95: check the size`
			);
		}
		const size: Omit<TireSize, 'text'> = {
			prefix: pre || suffix ? 'LT' : '',
			widthMm: widthIn * INCH_MM,
			aspectRatio,
			// A dash marks a diagonal (bias) flotation size such as 33x12.50-15.
			construction: cons === 'D' || cons === 'B' ? cons : cons === '-' ? 'D' : 'R',
			rimIn,
			flotation: true,
			overallDiameterIn: diameterIn,
			...readService(open, li, dual, speed, close)
		};
		if (cons === 'ZR') size.zr = true;
		if (xl) size.extraLoad = true;
		return { ...size, text: formatTireSize(size) };
	}

	throw new RangeError(`Cannot read "${text}" as a tire size. Write it like ${EXAMPLES}`);
}

/** The highest rated speed, if the size says: `orMore` when the marking means "above" (ZR alone, or brackets). */
export function ratedSpeed(size: TireSize): { kmh: number; orMore: boolean } | undefined {
	if (size.speedSymbol) return { kmh: speedSymbolToKmh(size.speedSymbol), orMore: Boolean(size.speedAbove) };
	if (size.zr) return { kmh: 240, orMore: true };
	return undefined;
}

export interface TireDimensions {
	sidewallMm: number;
	diameterMm: number;
	circumferenceMm: number;
	revsPerKm: number;
	revsPerMile: number;
}

/** Nominal unloaded dimensions. Flotation sizes use their marked inch diameter. */
export function tireDimensions(size: TireSize): TireDimensions {
	if (!(size.rimIn > 0)) throw new RangeError(`Rim diameter must be positive, got ${size.rimIn}`);
	let sidewallMm: number;
	let diameterMm: number;
	if (size.flotation && size.overallDiameterIn !== undefined) {
		diameterMm = size.overallDiameterIn * INCH_MM;
		sidewallMm = (diameterMm - size.rimIn * INCH_MM) / 2;
	} else {
		if (!(size.widthMm > 0)) throw new RangeError(`Section width must be positive, got ${size.widthMm} mm`);
		if (!(size.aspectRatio > 0)) throw new RangeError(`Aspect ratio must be positive, got ${size.aspectRatio}`);
		sidewallMm = (size.widthMm * size.aspectRatio) / 100;
		diameterMm = size.rimIn * INCH_MM + 2 * sidewallMm;
	}
	if (!(sidewallMm > 0)) throw new RangeError('The overall diameter must be larger than the rim');
	const circumferenceMm = Math.PI * diameterMm;
	return {
		sidewallMm,
		diameterMm,
		circumferenceMm,
		revsPerKm: 1e6 / circumferenceMm,
		revsPerMile: MILE_MM / circumferenceMm
	};
}

/**
 * What changing from one size to another does. A speedometer calibrated for `from` keeps counting revolutions, so at
 * an indicated 100 km/h the vehicle really travels 100 × D_to / D_from: a bigger tire reads low.
 */
export function compareTireSizes(
	from: TireSize,
	to: TireSize
): { diameterDiffMm: number; diameterDiffPct: number; trueKmhAtIndicated100: number } {
	const a = tireDimensions(from).diameterMm;
	const b = tireDimensions(to).diameterMm;
	return { diameterDiffMm: b - a, diameterDiffPct: (b / a - 1) * 100, trueKmhAtIndicated100: (100 * b) / a };
}

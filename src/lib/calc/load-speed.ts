/**
 * Load index → maximum load per tire, and speed symbol → maximum speed.
 *
 * Sources: the tables are published by ISO 4000-1, ETRTO and the Tire and Rim Association; those documents are
 * paywalled and were not read. The rows below agree with several independent public copies (see
 * shared/reference/check-values.md §2). Some public pages carry typos (LI 83 = 478 kg on one of them; every other copy
 * says 487), so only kilograms are stored and pounds are derived from the exact pound.
 * The steps are not linear: never interpolate between rows.
 */

const POUND_KG = 0.45359237;

/** Load index 60 is the first entry; kg per tire at the index's reference pressure. */
const LOAD_INDEX_FIRST = 60;
// prettier-ignore
const LOAD_KG: readonly number[] = [
	250, 257, 265, 272, 280, 290, 300, 307, 315, 325, // 60–69
	335, 345, 355, 365, 375, 387, 400, 412, 425, 437, // 70–79
	450, 462, 475, 487, 500, 515, 530, 545, 560, 580, // 80–89
	600, 615, 630, 650, 670, 690, 710, 730, 750, 775, // 90–99
	800, 825, 850, 875, 900, 925, 950, 975, 1000, 1030, // 100–109
	1060, 1090, 1120, 1150, 1180, 1215, 1250, 1285, 1320, 1360, // 110–119
	1400, 1450, 1500, 1550, 1600, 1650, 1700, 1750, 1800, 1850, // 120–129
	1900, 1950, 2000, 2060, 2120, 2180, 2240, 2300, 2360, 2430, // 130–139
	2500, 2575, 2650, 2725, 2800, 2900, 3000, 3075, 3150, 3250, // 140–149
	3350 // 150
];
const LOAD_INDEX_LAST = LOAD_INDEX_FIRST + LOAD_KG.length - 1;

export const LOAD_INDEX_RANGE = { min: LOAD_INDEX_FIRST, max: LOAD_INDEX_LAST } as const;

/** Maximum load per tire in kg for a load index (60–150). */
export function loadIndexToKg(index: number): number {
	if (!Number.isInteger(index)) throw new RangeError(`Load index must be a whole number, got ${index}`);
	if (index < LOAD_INDEX_FIRST || index > LOAD_INDEX_LAST) {
		throw new RangeError(
			`Load index ${index} is outside the table this app carries (${LOAD_INDEX_FIRST}–${LOAD_INDEX_LAST}); read the load from the sidewall or the maker's data book`
		);
	}
	return LOAD_KG[index - LOAD_INDEX_FIRST];
}

/** Maximum load per tire in pounds, rounded to the nearest pound as US charts print it. */
export function loadIndexToLb(index: number): number {
	return Math.round(loadIndexToKg(index) / POUND_KG);
}

/**
 * Speed symbols in ascending order of speed. H sits between U and V: it predates the alphabetical scheme.
 * A1–A8 and B–G are the low-speed symbols (public copies of the table; ISO/ETRTO not read).
 */
export const SPEED_SYMBOLS = [
	['A1', 5],
	['A2', 10],
	['A3', 15],
	['A4', 20],
	['A5', 25],
	['A6', 30],
	['A7', 35],
	['A8', 40],
	['B', 50],
	['C', 60],
	['D', 65],
	['E', 70],
	['F', 80],
	['G', 90],
	['J', 100],
	['K', 110],
	['L', 120],
	['M', 130],
	['N', 140],
	['P', 150],
	['Q', 160],
	['R', 170],
	['S', 180],
	['T', 190],
	['U', 200],
	['H', 210],
	['V', 240],
	['W', 270],
	['Y', 300]
] as const satisfies readonly (readonly [string, number])[];

export type SpeedSymbol = (typeof SPEED_SYMBOLS)[number][0];

const SPEED_KMH = new Map<string, number>(SPEED_SYMBOLS);

/** Maximum speed in km/h for a speed symbol (case and surrounding spaces ignored). */
export function speedSymbolToKmh(symbol: string): number {
	const s = symbol.trim().toUpperCase();
	const kmh = SPEED_KMH.get(s);
	if (kmh !== undefined) return kmh;
	if (s === 'ZR' || s === 'Z') {
		throw new RangeError(
			'ZR belongs to the size, not the service description: it means above 240 km/h. Enter the speed symbol that follows the load index'
		);
	}
	if (s === '(Y)') {
		throw new RangeError(
			'(Y) in brackets means above 300 km/h and has no single top speed; parse the whole size to get it as "300 km/h or more"'
		);
	}
	throw new RangeError(`Unknown speed symbol "${symbol}". Use one of ${SPEED_SYMBOLS.map(([s]) => s).join(', ')}`);
}

/** Maximum speed in mph, rounded to the nearest whole mph (km/h is the canonical value). */
export function speedSymbolToMph(symbol: string): number {
	return Math.round(speedSymbolToKmh(symbol) / 1.609344);
}

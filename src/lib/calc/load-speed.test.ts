import { describe, it, expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import {
	loadIndexToKg,
	loadIndexToLb,
	speedSymbolToKmh,
	speedSymbolToMph,
	SPEED_SYMBOLS,
	LOAD_INDEX_RANGE
} from './load-speed';

// The published load-index table (ISO 4000-1 / ETRTO / TRA, not read), as printed in public copies that agree
// [2nd: trailermedic.co.uk, sotiriou-service.gr, independent open data files], written here in decades.
const PUBLISHED_ROWS: Record<number, string> = {
	60: '250 257 265 272 280 290 300 307 315 325',
	70: '335 345 355 365 375 387 400 412 425 437',
	80: '450 462 475 487 500 515 530 545 560 580',
	90: '600 615 630 650 670 690 710 730 750 775',
	100: '800 825 850 875 900 925 950 975 1000 1030',
	110: '1060 1090 1120 1150 1180 1215 1250 1285 1320 1360',
	120: '1400 1450 1500 1550 1600 1650 1700 1750 1800 1850',
	130: '1900 1950 2000 2060 2120 2180 2240 2300 2360 2430',
	140: '2500 2575 2650 2725 2800 2900 3000 3075 3150 3250',
	150: '3350'
};
const published = new Map<number, number>();
for (const [start, row] of Object.entries(PUBLISHED_ROWS)) {
	row.split(' ').forEach((kg, i) => published.set(Number(start) + i, Number(kg)));
}
const POUND_KG = 0.45359237; // exact definition (1959 agreement)

describe('loadIndexToKg', () => {
	it('matches every row of the published table from 60 to 150 [2nd: public copies of the ETRTO/TRA table]', () => {
		expect(published.size).toBe(91);
		for (const [index, kg] of published) expect(loadIndexToKg(index), `LI ${index}`).toBe(kg);
		expect(LOAD_INDEX_RANGE).toEqual({ min: 60, max: 150 });
	});
	it('keeps LI 83 at 487 kg, not the 478 kg typo of one public page [2nd]', () => {
		expect(loadIndexToKg(83)).toBe(published.get(83));
		expect(loadIndexToKg(83)).not.toBe(478);
	});
	it('derives pounds from kg with the exact pound, not a retailer chart (exact definition)', () => {
		for (const index of [75, 83, 91, 94, 100, 110, 115, 121]) {
			expect(loadIndexToLb(index)).toBe(Math.round(published.get(index)! / POUND_KG));
		}
		// A retailer's chart prints 115 = 2,649 lb and 121 = 3,297 lb; both are typos [2nd].
		expect(loadIndexToLb(115)).not.toBe(2649);
		expect(loadIndexToLb(121)).not.toBe(3297);
	});
	it('has uneven steps, so interpolation would be wrong [2nd]', () => {
		expect(loadIndexToKg(95) - loadIndexToKg(94)).toBe(published.get(95)! - published.get(94)!);
		expect(loadIndexToKg(116) - loadIndexToKg(115)).toBe(published.get(116)! - published.get(115)!);
		expect(loadIndexToKg(95) - loadIndexToKg(94)).not.toBe(loadIndexToKg(116) - loadIndexToKg(115));
	});
	it('refuses indices outside the table or not whole', () => {
		expect(() => loadIndexToKg(59)).toThrow(/outside the table.*60–150/);
		expect(() => loadIndexToKg(151)).toThrow(RangeError);
		expect(() => loadIndexToKg(94.5)).toThrow(/whole number/);
	});
	fcTest.prop([fc.integer({ min: 60, max: 149 })])('load rises with every index', (i) => {
		expect(loadIndexToKg(i + 1)).toBeGreaterThan(loadIndexToKg(i));
	});
});

// Speed symbols in km/h from consumer charts that agree [2nd]; J and K from the tyresizecalculator chart [read].
const PUBLISHED_KMH: Record<string, number> = {
	J: 100,
	K: 110,
	L: 120,
	M: 130,
	N: 140,
	P: 150,
	Q: 160,
	R: 170,
	S: 180,
	T: 190,
	U: 200,
	H: 210,
	V: 240,
	W: 270,
	Y: 300
};

describe('speedSymbolToKmh', () => {
	it('matches the published chart [2nd; J, K read]', () => {
		for (const [symbol, kmh] of Object.entries(PUBLISHED_KMH)) expect(speedSymbolToKmh(symbol), symbol).toBe(kmh);
	});
	it('gives mph as km/h ÷ 1.609344 rounded (exact definition of the mile)', () => {
		for (const [symbol, kmh] of Object.entries(PUBLISHED_KMH)) {
			expect(speedSymbolToMph(symbol), symbol).toBe(Math.round(kmh / 1.609344));
		}
		// Some charts print H = 131 mph, P = 94, Q = 100 [2nd]; the definition gives otherwise.
		expect(speedSymbolToMph('H')).not.toBe(131);
		expect(speedSymbolToMph('P')).not.toBe(94);
		expect(speedSymbolToMph('Q')).not.toBe(100);
	});
	it('places H between U and V (published order, not alphabetical)', () => {
		const order = SPEED_SYMBOLS.map(([s]) => s as string);
		expect(order.indexOf('H')).toBe(order.indexOf('U') + 1);
		expect(order.indexOf('V')).toBe(order.indexOf('H') + 1);
		expect(speedSymbolToKmh('U')).toBeLessThan(speedSymbolToKmh('H'));
		expect(speedSymbolToKmh('H')).toBeLessThan(speedSymbolToKmh('V'));
	});
	it('knows the low-speed symbols A1–A8 and B–G [2nd: public data files; ISO/ETRTO not read]', () => {
		for (let i = 1; i <= 8; i++) expect(speedSymbolToKmh(`A${i}`)).toBe(5 * i);
		expect(speedSymbolToKmh('B')).toBe(50);
		expect(speedSymbolToKmh('G')).toBe(90);
	});
	it('ignores case and spaces', () => {
		expect(speedSymbolToKmh(' h ')).toBe(PUBLISHED_KMH.H);
	});
	it('sends ZR and (Y) back to the size parser with a reason, and refuses unknown letters', () => {
		expect(() => speedSymbolToKmh('ZR')).toThrow(/above 240 km\/h/);
		expect(() => speedSymbolToKmh('(Y)')).toThrow(/above 300 km\/h/);
		expect(() => speedSymbolToKmh('X')).toThrow(/Unknown speed symbol "X"/);
		expect(() => speedSymbolToKmh('I')).toThrow(RangeError);
	});
	it('lists symbols in strictly rising speed', () => {
		for (let i = 1; i < SPEED_SYMBOLS.length; i++) {
			expect(SPEED_SYMBOLS[i][1]).toBeGreaterThan(SPEED_SYMBOLS[i - 1][1]);
		}
	});
});

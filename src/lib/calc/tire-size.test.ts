import { describe, it, expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import { parseTireSize, tireDimensions, compareTireSizes, ratedSpeed, type TireSize } from './tire-size';
import { speedSymbolToKmh, loadIndexToKg } from './load-speed';

const INCH_MM = 25.4; // exact definition

/** The textbook definition [read: size-formula pages and an owner's-manual size chart], written out independently. */
function textbook(widthMm: number, aspect: number, rimIn: number) {
	const h = (widthMm * aspect) / 100;
	const dMm = rimIn * INCH_MM + 2 * h;
	const dIn = dMm / INCH_MM;
	return {
		h,
		dMm,
		c: Math.PI * dMm,
		revsPerKm: 1e6 / (Math.PI * dMm),
		// Per mile via inches: 63 360 in to the mile, a different route from the code's millimetres.
		revsPerMile: 63360 / (Math.PI * dIn)
	};
}

describe('tireDimensions', () => {
	const cases: [string, number, number, number][] = [
		['225/60R16', 225, 60, 16],
		['205/55R16', 205, 55, 16],
		['195/65R15', 195, 65, 15],
		['LT265/75R16', 265, 75, 16],
		['235/55R17', 235, 55, 17]
	];
	for (const [text, w, ar, rim] of cases) {
		it(`${text} follows the textbook size formula [read; values computed]`, () => {
			const d = tireDimensions(parseTireSize(text));
			const e = textbook(w, ar, rim);
			expect(d.sidewallMm).toBeCloseTo(e.h, 2);
			expect(d.diameterMm).toBeCloseTo(e.dMm, 2);
			expect(d.circumferenceMm).toBeCloseTo(e.c, 2);
			expect(d.revsPerKm).toBeCloseTo(e.revsPerKm, 6);
			expect(d.revsPerMile).toBeCloseTo(e.revsPerMile, 6);
		});
	}

	it('225/55R17 matches a public worked example: H 4.87 in, D 26.74 in, C 84.0 in, about 754 rev/mile [read: theprimecalculator formula page]', () => {
		const d = tireDimensions(parseTireSize('225/55R17'));
		expect(Math.abs(d.sidewallMm / INCH_MM - 4.87)).toBeLessThan(0.005);
		expect(Math.abs(d.diameterMm / INCH_MM - 26.74)).toBeLessThan(0.005);
		expect(Math.abs(d.circumferenceMm / INCH_MM - 84.0)).toBeLessThan(0.05);
		expect(Math.round(d.revsPerMile)).toBe(754);
		// check-values.md calls the exact value 754.3; the formula gives 754.11 (63 360 / (π × 26.744 in)).
		expect(d.revsPerMile).toBeCloseTo(63360 / (Math.PI * (17 + (2 * 225 * 55) / 100 / INCH_MM)), 9);
	});

	it("a flotation size is its marked diameter: 33x12.50R15 has a 9 in sidewall and an implied 72 % aspect [read: owner's-manual chart; computed]", () => {
		const size = parseTireSize('33x12.50R15');
		const d = tireDimensions(size);
		expect(d.diameterMm).toBeCloseTo(33 * INCH_MM, 6);
		expect(d.sidewallMm).toBeCloseTo(((33 - 15) / 2) * INCH_MM, 6);
		expect(size.aspectRatio).toBeCloseTo(((33 - 15) / 2 / 12.5) * 100, 9);
		expect(d.revsPerMile).toBeCloseTo(63360 / (Math.PI * 33), 6);
	});

	fcTest.prop([fc.integer({ min: 12, max: 40 }), fc.integer({ min: 5, max: 18 }), fc.integer({ min: 13, max: 24 })])(
		'revolutions per km times circumference is a kilometre, and per mile over per km is 1.609344 (exact definition)',
		(w5, ar5, rim) => {
			const d = tireDimensions(parseTireSize(`${w5 * 10 + 5}/${ar5 * 5}R${rim}`));
			expect(d.revsPerKm * d.circumferenceMm).toBeCloseTo(1e6, 4);
			expect(d.revsPerMile / d.revsPerKm).toBeCloseTo(1.609344, 9);
		}
	);

	it('refuses a hand-built size with no width', () => {
		const bad = { ...parseTireSize('225/60R16'), widthMm: 0 };
		expect(() => tireDimensions(bad)).toThrow(/Section width must be positive/);
	});
});

describe('compareTireSizes', () => {
	it('225/60R16 → 235/55R17: bigger tire, speedometer reads low (textbook formula; computed)', () => {
		const a = textbook(225, 60, 16).dMm;
		const b = textbook(235, 55, 17).dMm;
		const r = compareTireSizes(parseTireSize('225/60R16'), parseTireSize('235/55R17'));
		expect(r.diameterDiffMm).toBeCloseTo(b - a, 6);
		expect(r.diameterDiffPct).toBeCloseTo((b / a - 1) * 100, 6);
		expect(r.trueKmhAtIndicated100).toBeCloseTo((100 * b) / a, 6);
		expect(r.trueKmhAtIndicated100).toBeGreaterThan(100);
	});
	it('225/60R16 → 215/45R17: smaller tire, true speed below indicated (textbook formula; computed)', () => {
		const a = textbook(225, 60, 16).dMm;
		const b = textbook(215, 45, 17).dMm;
		const r = compareTireSizes(parseTireSize('225/60R16'), parseTireSize('215/45R17'));
		expect(r.diameterDiffMm).toBeCloseTo(b - a, 6);
		expect(r.diameterDiffPct).toBeCloseTo((b / a - 1) * 100, 6);
		expect(r.trueKmhAtIndicated100).toBeLessThan(100);
	});
	const sizeArb = fc
		.tuple(fc.integer({ min: 12, max: 40 }), fc.integer({ min: 5, max: 18 }), fc.integer({ min: 13, max: 24 }))
		.map(([w, ar, rim]) => parseTireSize(`${w * 10 + 5}/${ar * 5}R${rim}`));
	fcTest.prop([sizeArb, sizeArb])('going there and back cancels (exact definition)', (a, b) => {
		const there = compareTireSizes(a, b);
		const back = compareTireSizes(b, a);
		expect((there.trueKmhAtIndicated100 * back.trueKmhAtIndicated100) / 100).toBeCloseTo(100, 9);
		expect(there.diameterDiffMm + back.diameterDiffMm).toBeCloseTo(0, 9);
	});
});

describe('parseTireSize', () => {
	const pick = (s: TireSize) => ({
		prefix: s.prefix,
		widthMm: s.widthMm,
		aspectRatio: s.aspectRatio,
		construction: s.construction,
		rimIn: s.rimIn,
		loadIndex: s.loadIndex,
		loadIndexDual: s.loadIndexDual,
		speedSymbol: s.speedSymbol,
		flotation: s.flotation,
		text: s.text
	});

	it("reads European metric and P-metric (owner's-manual size chart: P = passenger, no prefix = European metric)", () => {
		expect(pick(parseTireSize('225/60R16'))).toEqual({
			prefix: '',
			widthMm: 225,
			aspectRatio: 60,
			construction: 'R',
			rimIn: 16,
			loadIndex: undefined,
			loadIndexDual: undefined,
			speedSymbol: undefined,
			flotation: false,
			text: '225/60R16'
		});
		const p = parseTireSize('P225/60R16 97H');
		expect([p.prefix, p.loadIndex, p.speedSymbol, p.text]).toEqual(['P', 97, 'H', 'P225/60R16 97H']);
	});
	it("reads an LT dual load index: first single fitment, second dual [read: a parts retailer's help article]", () => {
		const s = parseTireSize('LT265/75R16 123/120S');
		expect([s.prefix, s.loadIndex, s.loadIndexDual, s.speedSymbol]).toEqual(['LT', 123, 120, 'S']);
		expect(loadIndexToKg(s.loadIndex!)).toBeGreaterThan(loadIndexToKg(s.loadIndexDual!));
		expect(s.text).toBe('LT265/75R16 123/120S');
	});
	it("reads a temporary spare with diagonal construction (T = temporary spare, owner's-manual chart)", () => {
		const s = parseTireSize('T125/70D16');
		expect([s.prefix, s.construction, s.widthMm, s.aspectRatio, s.rimIn]).toEqual(['T', 'D', 125, 70, 16]);
	});
	it('reads ZR and bracketed service descriptions (ZR = above 240 km/h, (Y) = above 300 km/h [2nd: consumer charts])', () => {
		const zr = parseTireSize('245/40ZR18 97Y');
		expect([zr.construction, zr.zr, zr.text]).toEqual(['R', true, '245/40ZR18 97Y']);
		expect(ratedSpeed(zr)).toEqual({ kmh: speedSymbolToKmh('Y'), orMore: false });
		expect(ratedSpeed(parseTireSize('245/40ZR18'))).toEqual({ kmh: speedSymbolToKmh('V'), orMore: true });
		const open = parseTireSize('285/35 zr19 (99y)');
		expect([open.loadIndex, open.speedSymbol, open.speedAbove, open.text]).toEqual([99, 'Y', true, '285/35ZR19 (99Y)']);
		expect(ratedSpeed(open)).toEqual({ kmh: speedSymbolToKmh('Y'), orMore: true });
		expect(ratedSpeed(parseTireSize('225/60R16'))).toBeUndefined();
	});
	it("reads flotation sizes in inches (overall diameter x section width, rim; owner's-manual chart)", () => {
		const s = parseTireSize('31X10.50R15LT 109Q');
		expect(pick(s)).toEqual({
			prefix: 'LT',
			widthMm: 10.5 * INCH_MM,
			aspectRatio: ((31 - 15) / 2 / 10.5) * 100,
			construction: 'R',
			rimIn: 15,
			loadIndex: 109,
			loadIndexDual: undefined,
			speedSymbol: 'Q',
			flotation: true,
			text: '31x10.50R15LT 109Q'
		});
		const t = parseTireSize('33x12.50r15');
		expect([t.flotation, t.overallDiameterIn, t.widthMm, t.text]).toEqual([true, 33, 12.5 * INCH_MM, '33x12.50R15']);
	});
	it('reads the bare seven digits a writer types fast, radial assumed (common practice, no source)', () => {
		expect(parseTireSize('2256016').text).toBe('225/60R16');
		expect(parseTireSize('2256016 97h').text).toBe('225/60R16 97H');
	});
	it('ignores spaces and case', () => {
		expect(parseTireSize(' p 225 / 60 r 16   97 h ').text).toBe('P225/60R16 97H');
		expect(parseTireSize('lt265/75r16123/120s').text).toBe('LT265/75R16 123/120S');
	});
	it('reads C (commercial), ST, an LT suffix and XL markings', () => {
		const c = parseTireSize('195/70R15C 104/102R');
		expect([c.commercial, c.loadIndex, c.loadIndexDual, c.speedSymbol, c.text]).toEqual([
			true,
			104,
			102,
			'R',
			'195/70R15C 104/102R'
		]);
		expect(parseTireSize('265/75R16LT').prefix).toBe('LT');
		expect(parseTireSize('ST225/75R15').prefix).toBe('ST');
		const xl = parseTireSize('225/45R17 94W XL');
		expect([xl.extraLoad, xl.text]).toEqual([true, '225/45R17 94W XL']);
	});
	it('refuses what it cannot read, saying why', () => {
		expect(() => parseTireSize('225/10R16')).toThrow('Aspect ratio must be between 20 and 95, got 10');
		expect(() => parseTireSize('225/60R36')).toThrow(/Rim diameter \(in\) must be between 8 and 30/);
		expect(() => parseTireSize('225/60R16 97X')).toThrow(/Unknown speed symbol "X"/);
		expect(() => parseTireSize('LT265/75R16 120/123S')).toThrow(/second \(dual\) index is lower/);
		expect(() => parseTireSize('P265/75R16LT')).toThrow(/both P and LT/);
		expect(() => parseTireSize('22x12.50R24')).toThrow(/larger than the rim/);
		expect(() => parseTireSize('225/60R16 (97H')).toThrow(/bracket/);
		expect(() => parseTireSize('front left')).toThrow(/Cannot read "front left" as a tire size/);
		expect(() => parseTireSize('   ')).toThrow(/Enter a tire size/);
	});

	const written = fc.record({
		prefix: fc.constantFrom('', 'P', 'LT', 'T', 'ST'),
		width: fc.integer({ min: 12, max: 40 }).map((n) => n * 10 + 5),
		aspect: fc.integer({ min: 5, max: 17 }).map((n) => n * 5),
		construction: fc.constantFrom('R', 'D', 'B', 'ZR'),
		rim: fc.integer({ min: 13, max: 24 }),
		service: fc.option(
			fc.tuple(fc.integer({ min: 70, max: 126 }), fc.constantFrom('', 'S', 'T', 'H', 'V', 'W', 'Y', 'A8')),
			{ nil: undefined }
		),
		lower: fc.boolean(),
		spaced: fc.boolean()
	});
	fcTest.prop([written])(
		'reads back every field it is given, and its own canonical text parses to the same size',
		(w) => {
			const gap = w.spaced ? ' ' : '';
			let text = `${w.prefix}${gap}${w.width}/${w.aspect}${gap}${w.construction}${w.rim}`;
			if (w.service) text += ` ${w.service[0]}${w.service[1]}`;
			if (w.lower) text = text.toLowerCase();
			const s = parseTireSize(text);
			expect([s.prefix, s.widthMm, s.aspectRatio, s.rimIn, s.flotation]).toEqual([
				w.prefix,
				w.width,
				w.aspect,
				w.rim,
				false
			]);
			expect(s.construction).toBe(w.construction === 'ZR' ? 'R' : w.construction);
			expect(s.loadIndex).toBe(w.service?.[0]);
			expect(s.speedSymbol).toBe(w.service && w.service[1] !== '' ? w.service[1] : undefined);
			expect(parseTireSize(s.text)).toEqual(s);
		}
	);
});

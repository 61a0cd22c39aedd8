import { describe, it, expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import {
	staticCouple,
	planesFromStaticCouple,
	splitWeight,
	roundWeight,
	addCorrections,
	type Correction
} from './balance';

const RAD = Math.PI / 180;
// Complex numbers as [re, im]: a correction m at θ is m·e^{iθ} (ISO 1940-1 two-plane description; vector algebra exact).
type Z = [number, number];
const z = (g: number, deg: number): Z => [g * Math.cos(deg * RAD), g * Math.sin(deg * RAD)];
const magnitude = ([x, y]: Z) => Math.hypot(x, y);
const angle = ([x, y]: Z) => (((Math.atan2(y, x) / RAD) % 360) + 360) % 360;

function expectCorrection(actual: Correction, expected: Z, digits = 9) {
	expect(actual.g).toBeCloseTo(magnitude(expected), digits);
	if (magnitude(expected) > 1e-6) {
		const diff = ((((actual.deg - angle(expected)) % 360) + 540) % 360) - 180;
		expect(Math.abs(diff)).toBeLessThan(1e-6);
	}
}
const sameVector = (a: Correction, b: Correction, tol: number) => {
	const [ax, ay] = z(a.g, a.deg);
	const [bx, by] = z(b.g, b.deg);
	expect(Math.hypot(ax - bx, ay - by)).toBeLessThanOrEqual(tol);
};

describe('staticCouple: S = W_i + W_o, C = (W_o − W_i)/2 (ISO 1940-1 definitions [read]; vectors computed)', () => {
	const rows: [Correction, Correction][] = [
		[
			{ g: 20, deg: 0 },
			{ g: 20, deg: 180 }
		],
		[
			{ g: 25, deg: 0 },
			{ g: 25, deg: 0 }
		],
		[
			{ g: 30, deg: 0 },
			{ g: 10, deg: 90 }
		],
		[
			{ g: 15, deg: 45 },
			{ g: 40, deg: 225 }
		]
	];
	for (const [inner, outer] of rows) {
		it(`inner ${inner.g} g @${inner.deg}°, outer ${outer.g} g @${outer.deg}°`, () => {
			const [ix, iy] = z(inner.g, inner.deg);
			const [ox, oy] = z(outer.g, outer.deg);
			const r = staticCouple(inner, outer);
			expectCorrection(r.static, [ix + ox, iy + oy]);
			expectCorrection(r.couple, [(ox - ix) / 2, (oy - iy) / 2]);
		});
	}
	it('pure couple and pure static are told apart', () => {
		expect(staticCouple({ g: 20, deg: 0 }, { g: 20, deg: 180 }).static.g).toBeCloseTo(0, 9);
		expect(staticCouple({ g: 25, deg: 0 }, { g: 25, deg: 0 }).couple.g).toBeCloseTo(0, 9);
	});
	it('refuses a negative weight', () => {
		expect(() => staticCouple({ g: -5, deg: 0 }, { g: 5, deg: 0 })).toThrow(/Inner plane weight must be 0 g or more/);
	});

	const corr = fc.record({
		g: fc.double({ min: 0, max: 200, noNaN: true }),
		deg: fc.double({ min: 0, max: 359.999, noNaN: true })
	});
	fcTest.prop([corr, corr])('planes → static/couple → planes gives the planes back', (inner, outer) => {
		const { static: s, couple: c } = staticCouple(inner, outer);
		const back = planesFromStaticCouple(s, c);
		sameVector(back.inner, inner, 1e-9);
		sameVector(back.outer, outer, 1e-9);
	});
	fcTest.prop([corr, corr])('static/couple → planes → static/couple gives them back', (s, c) => {
		const { inner, outer } = planesFromStaticCouple(s, c);
		const back = staticCouple(inner, outer);
		sameVector(back.static, s, 1e-9);
		sameVector(back.couple, c, 1e-9);
	});
	fcTest.prop([corr, corr])('swapping the planes keeps the static and turns the couple round', (inner, outer) => {
		const a = staticCouple(inner, outer);
		const b = staticCouple(outer, inner);
		sameVector(a.static, b.static, 1e-9);
		sameVector(a.couple, { g: b.couple.g, deg: b.couple.deg + 180 }, 1e-9);
	});
});

describe('splitWeight (law of sines; computed)', () => {
	for (const alpha of [15, 20, 30]) {
		it(`60 g split ±${alpha}° either side gives W/(2 cos α) each`, () => {
			const [a, b] = splitWeight({ g: 60, deg: 90 }, 90 - alpha, 90 + alpha);
			expect(a.g).toBeCloseTo(60 / (2 * Math.cos(alpha * RAD)), 9);
			expect(b.g).toBeCloseTo(60 / (2 * Math.cos(alpha * RAD)), 9);
		});
	}
	it('50 g at 10° into 0° and 72°', () => {
		const [a, b] = splitWeight({ g: 50, deg: 10 }, 0, 72);
		expect(a).toEqual({ g: expect.closeTo((50 * Math.sin(62 * RAD)) / Math.sin(72 * RAD), 9), deg: 0 });
		expect(b).toEqual({ g: expect.closeTo((50 * Math.sin(10 * RAD)) / Math.sin(72 * RAD), 9), deg: 72 });
	});
	it('works across the valve (350° and 20° around 5°), and a weight on a position needs no partner', () => {
		const [a, b] = splitWeight({ g: 30, deg: 5 }, 350, 20);
		sameVector(addCorrections(a, b), { g: 30, deg: 5 }, 1e-9);
		expect(splitWeight({ g: 30, deg: 40 }, 40, 80)[1].g).toBe(0);
	});
	it('refuses positions in line, and a split that does not straddle the weight', () => {
		expect(() => splitWeight({ g: 50, deg: 90 }, 0, 180)).toThrow(/in line with each other/);
		expect(() => splitWeight({ g: 50, deg: 90 }, 30, 30)).toThrow(/in line/);
		expect(() => splitWeight({ g: 50, deg: 100 }, 0, 72)).toThrow(/not between 0° and 72°/);
		expect(() => splitWeight({ g: 50, deg: 100 }, 0, 200)).toThrow(/not between/);
	});

	const split = fc
		.record({
			g: fc.double({ min: 0, max: 200, noNaN: true }),
			deg: fc.double({ min: 0, max: 359, noNaN: true }),
			before: fc.double({ min: 1, max: 85, noNaN: true }),
			after: fc.double({ min: 1, max: 85, noNaN: true })
		})
		.map((r) => ({ weight: { g: r.g, deg: r.deg }, deg1: r.deg - r.before, deg2: r.deg + r.after }));
	fcTest.prop([split])('the two weights add back to the one, and neither is negative', ({ weight, deg1, deg2 }) => {
		const [a, b] = splitWeight(weight, deg1, deg2);
		expect(a.g).toBeGreaterThanOrEqual(0);
		expect(b.g).toBeGreaterThanOrEqual(0);
		sameVector(addCorrections(a, b), weight, 1e-9 * Math.max(1, weight.g));
	});
	fcTest.prop([split])('the order of the two positions does not matter', ({ weight, deg1, deg2 }) => {
		const [a, b] = splitWeight(weight, deg1, deg2);
		const [c, d] = splitWeight(weight, deg2, deg1);
		expect(c.g).toBeCloseTo(b.g, 9);
		expect(d.g).toBeCloseTo(a.g, 9);
	});
});

describe('roundWeight (common practice, no source)', () => {
	const OZ_G = 453.59237 / 16; // exact definition
	it('rounds to the nearest 5 g, ties up', () => {
		expect(roundWeight(12.4, 5)).toBe(10);
		expect(roundWeight(12.5, 5)).toBe(15);
		expect(roundWeight(13, 5)).toBe(15);
	});
	it('never rounds a need of half an increment or more to zero', () => {
		expect(roundWeight(2.5, 5)).toBe(5);
		expect(roundWeight(2.49, 5)).toBe(0);
		expect(roundWeight(OZ_G / 8, OZ_G / 4)).toBeCloseTo(OZ_G / 4, 6);
	});
	it('works in quarter ounces (0.25 oz = 7.087 g)', () => {
		expect(roundWeight(20, OZ_G / 4)).toBeCloseTo((3 * OZ_G) / 4, 6);
		expect(roundWeight(3 * (OZ_G / 4), OZ_G / 4)).toBeCloseTo((3 * OZ_G) / 4, 6);
	});
	it('refuses a negative need or no increment', () => {
		expect(() => roundWeight(-1, 5)).toThrow(/Weight must be 0 g or more/);
		expect(() => roundWeight(10, 0)).toThrow(/increment must be above 0 g/);
	});
	fcTest.prop([fc.double({ min: 0, max: 500, noNaN: true }), fc.constantFrom(1, 2.5, 5, 10, OZ_G / 4, OZ_G / 2)])(
		'lands on a whole number of increments within half an increment, and not on zero from half an increment up',
		(g, inc) => {
			const r = roundWeight(g, inc);
			expect(Math.abs(r / inc - Math.round(r / inc))).toBeLessThan(1e-6);
			expect(Math.abs(r - g)).toBeLessThanOrEqual(inc / 2 + 1e-6);
			if (g >= inc / 2) expect(r).toBeGreaterThan(0);
		}
	);
});

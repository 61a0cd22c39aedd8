import { describe, it, expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import { convert, quantityOf, UNITS, type Unit } from './units';

// Primary definitions, exact (1959 international yard and pound agreement; NIST SP 811 for g_n).
const INCH_M = 0.0254;
const FOOT_M = 0.3048;
const POUND_KG = 0.45359237;
const G_N = 9.80665;

const relClose = (actual: number, expected: number, rel: number) =>
	expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected));

describe('convert: exact factors', () => {
	it('psi to kPa is lbf per square inch (exact definition)', () => {
		relClose(convert(1, 'psi', 'kPa'), (POUND_KG * G_N) / INCH_M ** 2 / 1000, 1e-12);
	});
	it('psi agrees with the rounded NIST SP 811 App. B.8 factor 6.894 757 E+03 Pa (NIST SP 811, via check-values [2nd])', () => {
		relClose(convert(1, 'psi', 'kPa') * 1000, 6.894757e3, 5e-7);
	});
	it('ounce is a sixteenth of the pound (exact definition; NIST HB 44 App. C)', () => {
		relClose(convert(1, 'oz', 'g'), (POUND_KG * 1000) / 16, 1e-12);
	});
	it('lbf·ft is pound-force times the foot (exact definition)', () => {
		relClose(convert(1, 'lbf.ft', 'N.m'), POUND_KG * G_N * FOOT_M, 1e-12);
		relClose(convert(1, 'lbf.ft', 'N.m'), 1.355818, 5e-7); // NIST SP 811 App. B.8 rounded value [2nd]
	});
	it('lbf is the pound under standard gravity (exact definition)', () => {
		relClose(convert(1, 'lbf', 'N'), POUND_KG * G_N, 1e-12);
		relClose(convert(1, 'lbf', 'N'), 4.448222, 5e-7); // NIST SP 811 App. B.8 rounded value [2nd]
	});
	it('bar is 100 kPa (exact definition)', () => {
		relClose(convert(1, 'bar', 'psi'), 100 / ((POUND_KG * G_N) / INCH_M ** 2 / 1000), 1e-12);
	});
	it('inch, thirty-seconds and mile (exact definition)', () => {
		expect(convert(1, 'in', 'mm')).toBe(25.4);
		relClose(convert(1, 'mi', 'km'), (5280 * FOOT_M) / 1000, 1e-12);
		relClose(convert(1000, 'mm', 'km'), 1e-3, 1e-12);
	});
	it('tread limits in thirty-seconds convert to mm (49 CFR 393.75(b),(c); EU Directive 89/459/EEC)', () => {
		relClose(convert(2, 'in32', 'mm'), (2 / 32) * INCH_M * 1000, 1e-12);
		relClose(convert(4, 'in32', 'mm'), (4 / 32) * INCH_M * 1000, 1e-12);
		relClose(convert(1.6, 'mm', 'in32'), 1.6 / ((INCH_M * 1000) / 32), 1e-12);
	});
	it('temperatures (exact definition: K = °C + 273.15 = (°F + 459.67)/1.8)', () => {
		relClose(convert(20, 'C', 'F'), (20 * 9) / 5 + 32, 1e-12);
		relClose(convert(0, 'C', 'K'), 273.15, 1e-12);
		relClose(convert(-40, 'C', 'F'), -40, 1e-12);
		relClose(convert(70, 'F', 'K'), (70 + 459.67) / 1.8, 1e-12);
	});
});

describe('convert: refusals', () => {
	it('refuses to convert between different quantities', () => {
		expect(() => convert(30, 'psi', 'g')).toThrow(RangeError);
		expect(() => convert(30, 'psi', 'g')).toThrow(/psi \(pressure\) to g \(mass\)/);
		expect(() => convert(100, 'N.m', 'N')).toThrow(RangeError);
		expect(() => convert(20, 'C', 'kPa')).toThrow(RangeError);
	});
	it('refuses temperatures below absolute zero and non-numbers', () => {
		expect(() => convert(-300, 'C', 'K')).toThrow(/absolute zero/);
		expect(() => convert(Number.NaN, 'kPa', 'psi')).toThrow(RangeError);
		expect(() => convert(1, 'furlong' as Unit, 'mm')).toThrow(/Unknown unit/);
	});
});

const groups = new Map<string, Unit[]>();
for (const u of UNITS) groups.set(quantityOf(u), [...(groups.get(quantityOf(u)) ?? []), u]);
const sameQuantityPair = fc
	.constantFrom(...groups.values())
	.chain((units) => fc.tuple(fc.constantFrom(...units), fc.constantFrom(...units), fc.constantFrom(...units)));
const linearUnits = UNITS.filter((u) => quantityOf(u) !== 'temperature');

describe('convert: properties', () => {
	fcTest.prop([sameQuantityPair, fc.double({ min: 0, max: 1e6, noNaN: true })])(
		'a round trip returns the value, and going through a third unit changes nothing',
		([a, b, c], x) => {
			const back = convert(convert(x, a, b), b, a);
			expect(Math.abs(back - x)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(x)));
			const via = convert(convert(x, a, c), c, b);
			const direct = convert(x, a, b);
			expect(Math.abs(via - direct)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(direct)));
		}
	);
	fcTest.prop([
		fc.constantFrom(...linearUnits),
		fc.double({ min: -1e6, max: 1e6, noNaN: true }),
		fc.double({ min: -1e6, max: 1e6, noNaN: true })
	])('linear units convert sums to sums', (unit, x, y) => {
		const target = groups.get(quantityOf(unit))!.find((u) => u !== unit)!;
		const lhs = convert(x + y, unit, target);
		const cx = convert(x, unit, target);
		const cy = convert(y, unit, target);
		expect(Math.abs(lhs - (cx + cy))).toBeLessThanOrEqual(1e-12 * (Math.abs(cx) + Math.abs(cy) + 1));
	});
});

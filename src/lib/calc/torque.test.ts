import { describe, it, expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import { starSequence, nmToLbfFt, lbfFtToNm } from './torque';

/** Studs apart going the short way round a circle of n. */
const apart = (a: number, b: number, n: number) => Math.min((a - b + n) % n, (b - a + n) % n);

describe('starSequence (common practice, no source; published diagrams differ, so properties are tested)', () => {
	fcTest.prop([fc.integer({ min: 3, max: 10 })])('tightens every stud exactly once, starting at stud 1', (n) => {
		const seq = starSequence(n);
		expect(seq).toHaveLength(n);
		expect([...seq].sort((a, b) => a - b)).toEqual(Array.from({ length: n }, (_, i) => i + 1));
		expect(seq[0]).toBe(1);
	});
	fcTest.prop([fc.constantFrom(4, 6, 8, 10)])('even counts go in diametrically opposite pairs', (n) => {
		const seq = starSequence(n);
		for (let i = 0; i < n; i += 2) expect(apart(seq[i], seq[i + 1], n)).toBe(n / 2);
	});
	fcTest.prop([fc.constantFrom(6, 8, 10)])(
		'with six or more studs, a new pair never starts next to the last stud',
		(n) => {
			const seq = starSequence(n);
			for (let i = 1; i + 1 < n; i += 2) expect(apart(seq[i], seq[i + 1], n)).toBeGreaterThanOrEqual(2);
		}
	);
	fcTest.prop([fc.constantFrom(3, 5, 7, 9)])('odd counts jump as near to opposite as the circle allows', (n) => {
		const seq = starSequence(n);
		for (let i = 0; i + 1 < n; i++) expect(apart(seq[i], seq[i + 1], n)).toBe((n - 1) / 2);
	});
	it('five studs go every second stud [practice: check-values §8]', () => {
		const seq = starSequence(5);
		for (let i = 0; i + 1 < 5; i++) expect((seq[i + 1] - seq[i] + 5) % 5).toBe(2);
	});
	it('refuses counts outside 3–10', () => {
		expect(() => starSequence(2)).toThrow('Stud count must be a whole number from 3 to 10, got 2');
		expect(() => starSequence(12)).toThrow(RangeError);
		expect(() => starSequence(5.5)).toThrow(RangeError);
	});
});

describe('torque units (exact definition: 1 lbf·ft = 0.45359237 kg × 9.80665 m/s² × 0.3048 m)', () => {
	it('converts both ways', () => {
		const lbfFt = 0.45359237 * 9.80665 * 0.3048;
		expect(lbfFtToNm(100)).toBeCloseTo(100 * lbfFt, 9);
		expect(nmToLbfFt(100 * lbfFt)).toBeCloseTo(100, 9);
	});
});

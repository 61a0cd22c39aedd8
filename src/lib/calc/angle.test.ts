import { expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import { normalizeDeg } from './angle';

fcTest.prop([fc.double({ min: -1e6, max: 1e6, noNaN: true })])(
	'normalizeDeg lands in [0, 360) on the same direction (exact definition)',
	(deg) => {
		const n = normalizeDeg(deg);
		expect(n).toBeGreaterThanOrEqual(0);
		expect(n).toBeLessThan(360);
		expect(Math.cos((n * Math.PI) / 180)).toBeCloseTo(Math.cos((deg * Math.PI) / 180), 6);
		expect(Math.sin((n * Math.PI) / 180)).toBeCloseTo(Math.sin((deg * Math.PI) / 180), 6);
	}
);
fcTest.prop([fc.constantFrom(-5e-324, -1e-300, -1e-14, 360, 720, -360)])('edge values wrap to 0', (deg) => {
	expect(normalizeDeg(deg)).toBeCloseTo(0, 9);
	expect(normalizeDeg(deg)).toBeLessThan(360);
});

import { describe, it, expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import { boltCircleFromSpacing, studSpacing } from './bolt-circle';

/** Distance between two neighbouring stud centres placed on the circle by coordinates (exact geometry). */
function chordByCoordinates(pcd: number, n: number): number {
	const r = pcd / 2;
	const a = (2 * Math.PI) / n;
	return Math.hypot(r * Math.cos(a) - r, r * Math.sin(a));
}

describe('studSpacing', () => {
	const patterns: [number, number][] = [
		[4, 100],
		[4, 108],
		[5, 100],
		[5, 112],
		[5, 114.3],
		[5, 120],
		[6, 139.7],
		[8, 165.1]
	];
	for (const [n, pcd] of patterns) {
		it(`${n}×${pcd}: the chord between neighbours (exact geometry; also Z = Y·cos((180 − 360/X)/2) [read])`, () => {
			expect(studSpacing(pcd, n)).toBeCloseTo(chordByCoordinates(pcd, n), 9);
			const deg = Math.PI / 180;
			expect(studSpacing(pcd, n)).toBeCloseTo(pcd * Math.cos(((180 - 360 / n) / 2) * deg), 9);
		});
	}
	it('six studs are spaced at half the bolt circle (exact geometry: a hexagon)', () => {
		expect(studSpacing(139.7, 6)).toBeCloseTo(139.7 / 2, 9);
	});
});

describe('boltCircleFromSpacing', () => {
	it('five studs: PCD = 1.7013 × spacing; three studs: 1.1547 × spacing, "×1.154" on a public page [read]', () => {
		expect(boltCircleFromSpacing(1, 5)).toBeCloseTo(1.7013, 4);
		expect(boltCircleFromSpacing(1, 3)).toBeCloseTo(1.1547, 4);
		expect(Math.floor(boltCircleFromSpacing(1, 3) * 1000) / 1000).toBe(1.154); // that page truncates
	});
	it('is the diameter, not the radius some pages give as "adjacent / (2 sin 36°)" (exact geometry)', () => {
		const radiusFormula = 67.18 / (2 * Math.sin((36 * Math.PI) / 180));
		expect(boltCircleFromSpacing(67.18, 5)).toBeCloseTo(2 * radiusFormula, 9);
	});
	it('a measured 67.18 mm on five studs is the 114.3 bolt circle to within measuring (exact geometry)', () => {
		expect(Math.abs(boltCircleFromSpacing(67.18, 5) - 114.3)).toBeLessThan(0.05);
	});
	it('refuses nonsense', () => {
		expect(() => boltCircleFromSpacing(0, 5)).toThrow('Stud spacing must be a positive number of mm, got 0');
		expect(() => studSpacing(114.3, 2)).toThrow(/from 3 to 10/);
		expect(() => studSpacing(Number.NaN, 5)).toThrow(RangeError);
	});
	fcTest.prop([fc.double({ min: 50, max: 300, noNaN: true }), fc.integer({ min: 3, max: 10 })])(
		'spacing and bolt circle convert back and forth',
		(pcd, n) => {
			expect(boltCircleFromSpacing(studSpacing(pcd, n), n)).toBeCloseTo(pcd, 9);
			expect(studSpacing(pcd, n)).toBeLessThan(pcd);
		}
	);
});

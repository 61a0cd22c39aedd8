// Puncture repairability, rule by rule. Sources are check-values.md §11 (the USTMA/RMA passenger and light-truck wall
// chart as quoted by a tire maker's consumer page and dealer pages, [2nd]) unless a case names another.
import { describe, expect, it } from 'vitest';
import {
	PUNCTURE_MAX_DIAMETER_MM,
	REPAIR_CAUTION,
	REPAIR_MIN_TREAD_MM,
	punctureLocations,
	repairCheck,
	type RepairInput
} from './repair';

const IN_MM = 25.4; // exact (check-values §7)
const ok: RepairInput = { location: 'tread', diameterMm: 3 };

describe('repairCheck', () => {
	it('allows a 3 mm nail hole in the tread area [2nd: §11, tread area, ≤ 1/4 in (6 mm)]', () => {
		expect(repairCheck(ok)).toEqual({ repairable: true, reasons: [], scrap: false });
	});

	it('takes 6 mm, the chart’s metric figure, as the size limit: 6 mm passes, 6.01 mm does not [2nd: §11 "≤ 1/4 in (6 mm)"]', () => {
		expect(PUNCTURE_MAX_DIAMETER_MM).toBe(6);
		expect(repairCheck({ ...ok, diameterMm: 6 }).repairable).toBe(true);
		const over = repairCheck({ ...ok, diameterMm: 6.01 });
		expect(over.repairable).toBe(false);
		expect(over.reasons).toHaveLength(1);
		expect(over.reasons[0]).toMatch(/over the chart's metric limit of 6 mm/);
	});

	it('refuses exactly 1/4 in = 6.35 mm, naming both figures [2nd: §11; 1/4 in × 25.4 computed]', () => {
		const quarter = IN_MM / 4;
		expect(quarter).toBeCloseTo(6.35, 12);
		const advice = repairCheck({ ...ok, diameterMm: quarter });
		expect(advice.repairable).toBe(false);
		expect(advice.reasons[0]).toMatch(/within 1\/4 in \(6\.35 mm\) but over .* 6 mm/);
	});

	it('refuses an injury over 1/4 in with the plain size reason [2nd: §11]', () => {
		const advice = repairCheck({ ...ok, diameterMm: 8 });
		expect(advice.repairable).toBe(false);
		expect(advice.reasons[0]).toBe('Injury is 8.0 mm across: over the 6 mm (1/4 in) limit; replace the tire.');
	});

	it.each([
		['shoulder', /shoulder or belt-edge area/],
		['sidewall', /sidewall/],
		['bead', /bead/]
	] as const)(
		'refuses a %s injury: repairs are limited to the tread area [2nd: §11 "no repair in the sidewall, shoulder, or belt-edge area"]',
		(location, reason) => {
			const advice = repairCheck({ location, diameterMm: 3 });
			expect(advice.repairable).toBe(false);
			expect(advice.reasons).toHaveLength(1);
			expect(advice.reasons[0]).toMatch(reason);
			expect(advice.reasons[0]).toMatch(/limited to the tread area/);
		}
	);

	it('refuses an injury running at an angle into the shoulder [2nd: §11]', () => {
		const advice = repairCheck({ ...ok, angled: true });
		expect(advice.repairable).toBe(false);
		expect(advice.reasons).toEqual([
			'The injury runs at an angle into the shoulder: not repairable; replace the tire.'
		]);
		expect(repairCheck({ ...ok, angled: false }).repairable).toBe(true);
	});

	it('refuses a tire worn to 2/32 in = 1.5875 mm, and allows 3/32 in [2nd: §11, one page citing USTMA; 2·25.4/32 computed]', () => {
		expect(REPAIR_MIN_TREAD_MM).toBe((2 * IN_MM) / 32);
		const worn = repairCheck({ ...ok, treadDepthMm: (2 * IN_MM) / 32 });
		expect(worn.repairable).toBe(false);
		expect(worn.reasons[0]).toMatch(/worn to 1\.59 mm \(2\.0\/32 in\), at or below 2\/32 in/);
		expect(repairCheck({ ...ok, treadDepthMm: 1 }).repairable).toBe(false);
		expect(repairCheck({ ...ok, treadDepthMm: (3 * IN_MM) / 32 }).repairable).toBe(true);
		expect(repairCheck({ ...ok, treadDepthMm: null }).repairable).toBe(true);
	});

	it('still refuses 2/32 in after the record rounds it to 1.59 mm, and allows 1.60 mm [storage: numeric(5,2)]', () => {
		expect(repairCheck({ ...ok, treadDepthMm: 1.59 }).repairable).toBe(false);
		expect(repairCheck({ ...ok, treadDepthMm: 1.6 }).repairable).toBe(true);
	});

	it('refuses a repair that would overlap an earlier one [2nd: §11 "repairs must not overlap"]', () => {
		const advice = repairCheck({ ...ok, overlapsRepair: true });
		expect(advice).toEqual({
			repairable: false,
			reasons: ['The repair would overlap an earlier repair: repairs must not overlap.'],
			scrap: false
		});
	});

	it('scraps a tire with an existing improper repair [2nd: §11 "a tire with an existing improper repair is scrapped"]', () => {
		const advice = repairCheck({ ...ok, improperRepair: true });
		expect(advice.repairable).toBe(false);
		expect(advice.scrap).toBe(true);
		expect(advice.reasons[0]).toMatch(/^The tire carries an improper earlier repair: scrap it/);
	});

	it('lists every rule broken at once, scrap first [2nd: §11, all rules]', () => {
		const advice = repairCheck({
			location: 'sidewall',
			diameterMm: 9,
			angled: true,
			treadDepthMm: 1,
			overlapsRepair: true,
			improperRepair: true
		});
		expect(advice.repairable).toBe(false);
		expect(advice.scrap).toBe(true);
		expect(advice.reasons).toHaveLength(6);
		expect(advice.reasons[0]).toMatch(/scrap it/);
	});

	it('refuses input that is not a measurement with a RangeError (DESIGN.md §7)', () => {
		expect(() => repairCheck({ ...ok, diameterMm: 0 })).toThrow(RangeError);
		expect(() => repairCheck({ ...ok, diameterMm: -2 })).toThrow(/diameter in mm/);
		expect(() => repairCheck({ ...ok, diameterMm: Number.NaN })).toThrow(RangeError);
		expect(() => repairCheck({ ...ok, location: 'rim' as never })).toThrow(/tread, shoulder, sidewall, bead/);
		expect(() => repairCheck({ ...ok, treadDepthMm: -1 })).toThrow(/Tread depth must be 0 mm or more/);
	});

	it('defers to the tire maker and states the method, as the chart does [2nd: §11]', () => {
		expect(punctureLocations).toEqual(['tread', 'shoulder', 'sidewall', 'bead']);
		expect(REPAIR_CAUTION).toMatch(/tire maker’s repair policy rules and may be stricter/);
		expect(REPAIR_CAUTION).toMatch(/Demount the tire and inspect it inside/);
		expect(REPAIR_CAUTION).toMatch(/a plug alone or a patch alone is not a repair/);
		expect(REPAIR_CAUTION).toMatch(/inner tube never replaces one/);
	});
});

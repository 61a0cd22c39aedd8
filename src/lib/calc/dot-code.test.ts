import { describe, it, expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import { parseDotDate, firstWeekStart } from './dot-code';

const DAY = 86_400_000;
const utc = (y: number, m: number, d: number) => new Date(Date.UTC(y, m - 1, d));
const TODAY = utc(2025, 11, 16);

/** Week 01 starts on the first Sunday whose Sunday-to-Saturday week lies wholly in the year (49 CFR 574.5(b)(3)). */
function ruleWeekStart(week: number, year: number): Date {
	let day = utc(year, 1, 1);
	while (day.getUTCDay() !== 0) day = new Date(day.getTime() + DAY);
	return new Date(day.getTime() + (week - 1) * 7 * DAY);
}

describe('parseDotDate', () => {
	it("follows the rule's own example: 0109 is the week Sun 4 Jan – Sat 10 Jan 2009 [2nd: 49 CFR 574.5(b)(3) quoted]", () => {
		const d = parseDotDate('0109', TODAY);
		expect([d.week, d.year]).toEqual([1, 2009]);
		expect(d.weekStart.toISOString().slice(0, 10)).toBe('2009-01-04');
		expect(d.weekStart.getUTCDay()).toBe(0);
	});
	it('reads 4519 as week 45 of 2019 (49 CFR 574.5: WWYY)', () => {
		const d = parseDotDate('4519', TODAY);
		expect([d.week, d.year]).toEqual([45, 2019]);
		expect(d.weekStart).toEqual(ruleWeekStart(45, 2019));
		expect(d.ageYears).toBeCloseTo((TODAY.getTime() - ruleWeekStart(45, 2019).getTime()) / (365.2425 * DAY), 9);
	});
	it('takes the date code from a full TIN, grouped or run together (49 CFR 574.5: the date code is the last group)', () => {
		for (const tin of ['DOT U2LL LMLR 5107', 'dot u2ll lmlr 5107', 'U2LLLMLR5107', 'DOT ABC U2LL LMLR 5107']) {
			const d = parseDotDate(tin, TODAY);
			expect([d.week, d.year], tin).toEqual([51, 2007]);
		}
	});
	it('refuses a date after today: 2247 is not week 22 of 2047 (common practice, no source)', () => {
		expect(() => parseDotDate('DOT U2LL LMLR 2247', TODAY)).toThrow(/week 22 of 2047, which has not started yet/);
		// The current week is accepted on its first day.
		expect(parseDotDate('0109', utc(2009, 1, 4)).ageYears).toBe(0);
		expect(() => parseDotDate('0109', utc(2009, 1, 3))).toThrow(RangeError);
	});
	it('refuses week 00, weeks over 53, and a week 53 the year does not have (49 CFR 574.5)', () => {
		expect(() => parseDotDate('0019', TODAY)).toThrow(/Week 00 .* weeks run 01 to 53/);
		expect(() => parseDotDate('5419', TODAY)).toThrow(/Week 54/);
		// 1 Jan 2023 was a Sunday, so 2023 has a 53rd week starting 31 Dec; 2019 (1 Jan a Tuesday) does not.
		expect(utc(2023, 1, 1).getUTCDay()).toBe(0);
		expect(parseDotDate('5323', TODAY).weekStart).toEqual(ruleWeekStart(53, 2023));
		expect(() => parseDotDate('5319', TODAY)).toThrow(/Week 53 does not exist in 2019/);
	});
	it('refuses a three-digit code as made before 2000 [read: 64 FR 36807 replaced 3 digits with 4]', () => {
		expect(() => parseDotDate('439', TODAY)).toThrow(/made before 2000/);
		expect(() => parseDotDate('DOT XB 12AB 439', TODAY)).toThrow(/made before 2000/);
		expect(() => parseDotDate('XB12AB439', TODAY)).toThrow(/made before 2000/);
	});
	it('refuses text with no date code', () => {
		expect(() => parseDotDate('', TODAY)).toThrow(/four-digit date code/);
		expect(() => parseDotDate('DOT U2LL LMLR', TODAY)).toThrow(/not a date code/);
		expect(() => parseDotDate('45A9', TODAY)).toThrow(/not a date code/);
	});
	it('defaults today to now', () => {
		expect(parseDotDate('4519').ageYears).toBeGreaterThan(6);
	});

	fcTest.prop([fc.integer({ min: 1, max: 52 }), fc.integer({ min: 0, max: 24 })])(
		'every week 01–52 starts on a Sunday in its year, seven days after the previous week (49 CFR 574.5)',
		(week, yy) => {
			const code = `${String(week).padStart(2, '0')}${String(yy).padStart(2, '0')}`;
			const d = parseDotDate(code, TODAY);
			expect([d.week, d.year]).toEqual([week, 2000 + yy]);
			expect(d.weekStart).toEqual(ruleWeekStart(week, 2000 + yy));
			expect(d.weekStart.getUTCDay()).toBe(0);
			expect(d.weekStart.getUTCFullYear()).toBe(2000 + yy);
			if (week > 1) {
				const prev = parseDotDate(`${String(week - 1).padStart(2, '0')}${code.slice(2)}`, TODAY);
				expect(d.weekStart.getTime() - prev.weekStart.getTime()).toBe(7 * DAY);
			}
		}
	);
	fcTest.prop([fc.integer({ min: 1900, max: 2200 })])(
		'week 01 starts within the first seven days of January',
		(year) => {
			const start = firstWeekStart(year);
			expect(start.getUTCMonth()).toBe(0);
			expect(start.getUTCDate()).toBeLessThanOrEqual(7);
			expect(start.getUTCDay()).toBe(0);
		}
	);
});

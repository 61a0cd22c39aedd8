// Flags and cautions on a wheel record, with worked values. Limits come from ../shared/reference/check-values.md,
// named beside each check; conversions are recomputed from the exact definitions (check-values §7).
import { describe, expect, it } from 'vitest';
import {
	CAUTIONS,
	EU_MIN_TREAD_MM,
	US_FRONT_HEAVY_MIN_TREAD_MM,
	US_MIN_TREAD_MM,
	cautionsFor,
	flagsOf,
	fromSi,
	readInput,
	toSi,
	type FlagContext,
	type MeasuredField
} from './flags';
import type { StoreUnits } from '$lib/schemas/floor';
import { siUnits } from '$lib/console/display';

const IN_MM = 25.4;
const LB_KG = 0.45359237;
const OZ_G = (LB_KG * 1000) / 16;
const LBF_N = LB_KG * 9.80665;
const PSI_KPA = LBF_N / (IN_MM / 1000) ** 2 / 1000;
const LBF_FT_NM = LBF_N * 0.3048;
const utc = (y: number, m: number, d: number) => new Date(Date.UTC(y, m - 1, d));

const imperial: StoreUnits = {
	pressure: 'psi',
	mass: 'oz',
	torque: 'lbf.ft',
	length: 'in',
	tread: 'in32',
	force: 'lbf'
};

const ctx: FlagContext = {
	today: utc(2026, 12, 2),
	tireAgeLimitYears: 10,
	forceLimitN: 111.2,
	leadAllowed: false,
	vehicleTorqueNm: 110,
	weightIncrementG: 5
};

const on = (flags: ReturnType<typeof flagsOf>, field: string) => flags.filter((f) => f.field === field);

describe('flagsOf: tread depth', () => {
	it('flags 2/32 in = 1.5875 mm as below the minimum, with both sources [§5: 2·25.4/32 computed; FMVSS 109/119; 89/459/EEC]', () => {
		expect(US_MIN_TREAD_MM).toBe((2 * IN_MM) / 32);
		const [flag, ...rest] = flagsOf({ treadDepthMm: (2 * IN_MM) / 32 }, ctx);
		expect(rest).toEqual([]);
		expect(flag).toMatchObject({ field: 'treadDepthMm', level: 'stop' });
		expect(flag.message).toBe(
			'Tread 1.59 mm is below the minimum: 1.6 mm in the EU, 2/32 in (1.5875 mm) where the US wear bars show. ' +
				'Replace the tire. The front wheels of a bus or truck need 4/32 in.'
		);
		expect(flag.source).toMatch(/Directive 89\/459\/EEC/);
		expect(flag.source).toMatch(/FMVSS 109\/119/);
		expect(flag.source).toMatch(
			/49 CFR 393\.75\(c\) 2\/32 in, 393\.75\(b\) 4\/32 in on the front wheels of a bus or truck/
		);
	});

	it('takes 1.6 mm as the EU boundary: 1.6 passes, 1.59 is flagged [§5: 89/459/EEC "at least 1.6 mm"]', () => {
		expect(EU_MIN_TREAD_MM).toBe(1.6);
		expect(flagsOf({ treadDepthMm: 1.6 }, ctx)).toEqual([]);
		expect(on(flagsOf({ treadDepthMm: 1.59 }, ctx), 'treadDepthMm')).toHaveLength(1);
		expect(on(flagsOf({ treadDepthMm: 0 }, ctx), 'treadDepthMm')[0].level).toBe('stop');
	});

	it('shows the depth in 32nds with mm beside in a store that reads 32nds', () => {
		// 1.5 mm = 1.5·32/25.4 = 1.89/32 in.
		const [flag] = flagsOf({ treadDepthMm: 1.5 }, { ...ctx, units: imperial });
		expect(flag.message).toMatch(/^Tread 1\.9\/32 in \(1\.5 mm\) is below the minimum/);
	});

	it('on the front wheel of a bus or truck, flags below 4/32 in = 3.175 mm [§5: 49 CFR 393.75(b)]', () => {
		expect(US_FRONT_HEAVY_MIN_TREAD_MM).toBe((4 * IN_MM) / 32);
		const heavy = { ...ctx, busOrTruckFront: true };
		const [flag] = flagsOf({ treadDepthMm: 3.1 }, heavy);
		expect(flag).toMatchObject({ field: 'treadDepthMm', level: 'stop' });
		expect(flag.message).toMatch(/below 4\/32 in \(3\.175 mm\), the minimum on the front wheels of a bus or truck/);
		expect(flagsOf({ treadDepthMm: (4 * IN_MM) / 32 }, heavy)).toEqual([]);
		// The same depth on a car is not flagged.
		expect(flagsOf({ treadDepthMm: 3.1 }, ctx)).toEqual([]);
	});
});

describe('flagsOf: DOT age', () => {
	it('warns past the store’s age policy and says the policy is not law [§3: age thresholds are policy, not law]', () => {
		// Week 01 of 2015 starts Sun 4 Jan 2015 (the first full Sunday–Saturday week, 49 CFR 574.5): on 2 Dec 2026 the
		// tire is (2026-12-02 − 2015-01-04) / 365.2425 days ≈ 11.9 years old.
		const age = (utc(2026, 12, 2).getTime() - utc(2015, 1, 4).getTime()) / (365.2425 * 86_400_000);
		const [flag] = flagsOf({ dotCode: 'DOT U2LL LMLR 0115' }, ctx);
		expect(flag).toMatchObject({ field: 'dotCode', level: 'warn' });
		expect(flag.message).toBe(
			`Tire made in week 1 of 2015 is ${age.toFixed(1)} years old, past the store's limit of 10 years: advise the customer to replace it.`
		);
		expect(flag.source).toMatch(/policy, not law/);
		expect(flag.source).toMatch(/49 CFR 574\.5/);
	});

	it('does not warn within the policy, and follows the store’s own limit', () => {
		expect(flagsOf({ dotCode: '2319' }, ctx)).toEqual([]);
		expect(on(flagsOf({ dotCode: '2319' }, { ...ctx, tireAgeLimitYears: 3 }), 'dotCode')).toHaveLength(1);
	});

	it('reports a pre-2000 three-digit code with the parser’s reason [§3: 3 digits before 2000]', () => {
		const [flag] = flagsOf({ dotCode: 'DOT XB 12AB 439' }, ctx);
		expect(flag).toMatchObject({ field: 'dotCode', level: 'warn' });
		expect(flag.message).toMatch(/made before 2000/);
	});
});

describe('flagsOf: force variation, torque, weights', () => {
	it('warns when force variation after is over the store’s limit, equal passes', () => {
		expect(flagsOf({ forceAfterN: 111.2, forceBeforeN: 300 }, ctx)).toEqual([]);
		const [flag] = flagsOf({ forceAfterN: 130 }, ctx);
		expect(flag).toMatchObject({ field: 'forceAfterN', level: 'warn' });
		expect(flag.message).toBe(
			"Force variation after 130 N is over the store's limit of 111 N: match-mount the tire (turn its high point to the rim's low point) and measure again."
		);
		expect(flagsOf({ forceAfterN: 130, matchMounted: true }, ctx)[0].message).toMatch(/already match-mounted/);
	});

	it('shows force in lbf with N beside: 130 N = 29.2 lbf [§7: 1 lbf = 4.4482216152605 N]', () => {
		const [flag] = flagsOf({ forceAfterN: 130 }, { ...ctx, units: imperial });
		expect(flag.message).toContain(`${(130 / LBF_N).toFixed(1)} lbf (130 N)`);
	});

	it('stops torque more than 5 % off the vehicle’s value either way, marked as common practice', () => {
		// 5 % of 110 N·m is 5.5 N·m: 104.5 and 115.5 pass, 104 and 116 do not.
		expect(flagsOf({ torqueAppliedNm: 104.5 }, ctx)).toEqual([]);
		expect(flagsOf({ torqueAppliedNm: 115.5 }, ctx)).toEqual([]);
		const [low] = flagsOf({ torqueAppliedNm: 95 }, ctx);
		expect(low).toMatchObject({ field: 'torqueAppliedNm', level: 'stop' });
		expect(low.message).toBe(
			"Torque applied 95 N·m is 15 N·m below the vehicle's 110 N·m (more than the 5 % allowed): re-torque in the star order with a calibrated torque wrench."
		);
		expect(low.source).toMatch(/common practice/);
		const [high] = flagsOf({ torqueAppliedNm: 130 }, ctx);
		expect(high.message).toMatch(/20 N·m above the vehicle's 110 N·m .* replace any stud or nut/);
	});

	it('shows torque in lbf·ft with N·m beside: 110 N·m = 81 lbf·ft [§7: 1 lbf·ft = 1.3558179483314 N·m]', () => {
		const [flag] = flagsOf({ torqueAppliedNm: 95 }, { ...ctx, units: imperial });
		expect(flag.message).toContain(`the vehicle's ${Math.round(110 / LBF_FT_NM)} lbf·ft (110 N·m)`);
	});

	it('warns when a torque is recorded but the vehicle data has none', () => {
		const [flag] = flagsOf({ torqueAppliedNm: 110 }, { ...ctx, vehicleTorqueNm: null });
		expect(flag).toMatchObject({ field: 'torqueAppliedNm', level: 'warn' });
		expect(flag.message).toMatch(/no torque value: check it against the vehicle maker's service information/);
	});

	it('warns on a weight that is not a multiple of the store’s step and names the nearest one (roundWeight)', () => {
		const flags = flagsOf(
			{
				weights: [
					{ plane: 'inner', type: 'adhesive', grams: 25, angleDeg: 0 },
					{ plane: 'outer', type: 'clip', grams: 23, angleDeg: 180 },
					{ plane: 'outer', type: 'clip', grams: 2, angleDeg: 90 }
				]
			},
			ctx
		);
		expect(flags.map((f) => f.field)).toEqual(['weights.1.grams', 'weights.2.grams']);
		expect(flags[0].message).toBe(
			"Weight 2 (outer, clip, 23 g) is not a multiple of the store's 5 g step: the nearest stocked weight is 25 g."
		);
		expect(flags[1].message).toMatch(/under half the store's smallest step of 5 g/);
	});

	it('takes ounce weights entered in a quarter-ounce store as whole steps [§7: 1 oz = 28.349523125 g]', () => {
		const quarterOz = OZ_G / 4;
		const weights = [{ plane: 'inner' as const, type: 'clip' as const, grams: 3 * quarterOz, angleDeg: 10 }];
		expect(flagsOf({ weights }, { ...ctx, weightIncrementG: quarterOz })).toEqual([]);
		const [flag] = flagsOf(
			{ weights: [{ ...weights[0], grams: 20 }] },
			{ ...ctx, weightIncrementG: quarterOz, units: imperial }
		);
		// 20 g = 0.71 oz; nearest 3 × 0.25 oz = 0.75 oz (21.3 g).
		expect(flag.message).toContain(`nearest stocked weight is 0.75 oz (${(3 * quarterOz).toFixed(1)} g)`);
	});
});

describe('flagsOf: puncture', () => {
	it('stops a puncture that may not be repaired, with repair.ts reasons [§11]', () => {
		const [flag] = flagsOf(
			{ damage: { tire: ['puncture'], rim: [], puncture: { location: 'sidewall', diameterMm: 3 } } },
			ctx
		);
		expect(flag).toMatchObject({ field: 'damage.puncture', level: 'stop' });
		expect(flag.message).toMatch(/^Puncture not repairable: Injury in the sidewall/);
		expect(flag.source).toMatch(/may be stricter/);
	});

	it('uses the record’s tread depth: a tread hole in a tire worn to 2/32 in is not repaired [§11]', () => {
		const damage = { tire: ['puncture' as const], rim: [], puncture: { location: 'tread' as const, diameterMm: 3 } };
		expect(flagsOf({ damage, treadDepthMm: 5 }, ctx)).toEqual([]);
		expect(on(flagsOf({ damage, treadDepthMm: 1.59 }, ctx), 'damage.puncture')[0].message).toMatch(
			/at or below 2\/32 in/
		);
	});

	it('says scrap for an improper earlier repair [§11]', () => {
		const damage = { tire: [], rim: [], puncture: { location: 'tread' as const, diameterMm: 3, improperRepair: true } };
		expect(flagsOf({ damage }, ctx)[0].message).toMatch(/^Scrap the tire: /);
	});
});

describe('flagsOf: blanks and settings', () => {
	it('raises nothing for an empty or cleared record, nor for a damage object stored as {}', () => {
		expect(flagsOf({}, ctx)).toEqual([]);
		expect(
			flagsOf({ treadDepthMm: null, dotCode: null, forceAfterN: null, torqueAppliedNm: null, weights: [] }, ctx)
		).toEqual([]);
		expect(flagsOf({ damage: {} as never }, ctx)).toEqual([]);
	});

	it('refuses settings that cannot be right', () => {
		expect(() => flagsOf({}, { ...ctx, weightIncrementG: 0 })).toThrow(RangeError);
		expect(() => flagsOf({}, { ...ctx, forceLimitN: -1 })).toThrow(/Force-variation limit/);
		expect(() => flagsOf({}, { ...ctx, today: new Date(Number.NaN) })).toThrow(/valid date/);
	});
});

describe('cautionsFor (DESIGN.md §10)', () => {
	it('shows inflation, torque, repair and lead cautions where the record calls for them', () => {
		const all = cautionsFor(
			{
				pressureSetKpa: 240,
				torqueAppliedNm: 110,
				damage: { tire: ['puncture'], rim: [] },
				weights: [{ plane: 'inner', type: 'clip', grams: 10, angleDeg: 0 }]
			},
			{ leadAllowed: false }
		);
		expect(all.map((c) => c.topic)).toEqual(['inflation', 'torque', 'repair', 'lead weights']);
		expect(cautionsFor({}, { leadAllowed: false })).toEqual([]);
	});

	it('leaves out the lead caution where the store allows lead, and assumes it does not when not told', () => {
		const weights = [{ plane: 'inner' as const, type: 'clip' as const, grams: 10, angleDeg: 0 }];
		expect(cautionsFor({ weights }, { leadAllowed: true })).toEqual([]);
		expect(cautionsFor({ weights }).map((c) => c.topic)).toEqual(['lead weights']);
	});

	it('says what §10 says, and marks the re-torque distance as common practice [§8: re-torque after 50–100 miles is practice]', () => {
		expect(CAUTIONS.inflation.text).toMatch(/cage or with a clip-on chuck and a remote valve/);
		expect(CAUTIONS.inflation.text).toMatch(/Never go past the maximum pressure moulded on the tire to seat a bead/);
		expect(CAUTIONS.torque.text).toMatch(/calibrated torque wrench in the star order/);
		expect(CAUTIONS.torque.text).toMatch(/not with an impact gun alone/);
		expect(CAUTIONS.torque.text).toMatch(/re-torque after the first 50–100 miles \(80–160 km\): common practice/);
		expect(CAUTIONS.repair.text).toMatch(/^Repair only in the tread area and only injuries up to 6 mm \(1\/4 in\)/);
		expect(CAUTIONS['lead weights'].text).toMatch(/does not fit lead weights/);
	});
});

describe('edge conversions: store units ↔ SI', () => {
	const cases: [MeasuredField, StoreUnits, number, number][] = [
		// [field, units, typed value, SI value from the exact definitions (check-values §7)]
		['treadDepthMm', imperial, 5, (5 * IN_MM) / 32],
		['pressureSetKpa', imperial, 35, 35 * PSI_KPA],
		['pressureSetKpa', { ...siUnits, pressure: 'bar' }, 2.4, 240],
		['weightGrams', imperial, 0.25, OZ_G / 4],
		['forceAfterN', imperial, 25, 25 * LBF_N],
		['torqueAppliedNm', imperial, 80, 80 * LBF_FT_NM],
		['punctureDiameterMm', imperial, 0.25, 6.35],
		['treadDepthMm', siUnits, 6.5, 6.5]
	];

	it.each(cases)('%s: %o %d → SI and back', (field, units, typed, si) => {
		const toSiValue = toSi(field, typed, units)!;
		expect(Math.abs(toSiValue - si) / si).toBeLessThanOrEqual(1e-12);
		expect(Math.abs(fromSi(field, toSiValue, units)! - typed) / typed).toBeLessThanOrEqual(1e-12);
	});

	it('round-trips any value through each store unit', () => {
		for (const [field, units] of cases) {
			for (const v of [0.1, 1, 3.3, 17.25, 999]) {
				expect(fromSi(field, toSi(field, v, units), units)).toBeCloseTo(v, 10);
			}
		}
	});

	it('keeps null as null (a cleared field)', () => {
		expect(toSi('treadDepthMm', null, imperial)).toBeNull();
		expect(fromSi('pressureSetKpa', null, imperial)).toBeNull();
	});

	it('reads what was typed: blank clears, comma decimals, 5/32 in 32nds', () => {
		expect(readInput('treadDepthMm', '', imperial)).toBeNull();
		expect(readInput('treadDepthMm', '  5/32 ', imperial)).toBe((5 * IN_MM) / 32);
		expect(readInput('treadDepthMm', '5 / 32 in', imperial)).toBe((5 * IN_MM) / 32);
		expect(readInput('treadDepthMm', '1,6', siUnits)).toBe(1.6);
		expect(readInput('pressureSetKpa', '35', imperial)).toBeCloseTo(35 * PSI_KPA, 10);
		expect(() => readInput('pressureSetKpa', '35psi', imperial)).toThrow(
			'"35psi" is not a number: enter the value in psi'
		);
		expect(() => readInput('treadDepthMm', 'abc', imperial)).toThrow(/enter the value in \/32 in/);
	});
});

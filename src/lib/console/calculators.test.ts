// The calculators in the store's units. Every expected value is worked out here from the definitions or the published
// figure named beside it (../shared/reference/check-values.md), never read back from the code under test.
import { describe, expect, it } from 'vitest';
import { answer, calculatorsFor, defaultValues, impliedUnits } from './calculators';
import { siUnits } from './display';
import type { StoreUnits } from '$lib/schemas/floor';

/** The demo store's units (seeds/lib/reference.ts), the usual US set. */
const imperial: StoreUnits = {
	pressure: 'psi',
	mass: 'oz',
	torque: 'lbf.ft',
	length: 'in',
	tread: 'in32',
	force: 'lbf'
};
/** A metric store that reads pressure in bar. */
const barStore: StoreUnits = { ...siUnits, pressure: 'bar' };

// Exact definitions (check-values §7): 1 in = 25.4 mm, 1 lb = 0.453 592 37 kg, g_n = 9.806 65 m/s², 1 oz = lb/16,
// 1 bar = 100 kPa, 1 atm = 101.325 kPa, 1 ft = 0.3048 m, K = °C + 273.15 = (°F + 459.67)/1.8.
const IN_MM = 25.4;
const LB_KG = 0.45359237;
const OZ_G = (LB_KG * 1000) / 16;
const PSI_KPA = (LB_KG * 9.80665) / (IN_MM / 1000) ** 2 / 1000;
const ATM_KPA = 101.325;
const FT_M = 0.3048;
const kelvinC = (c: number) => c + 273.15;
const kelvinF = (f: number) => (f + 459.67) / 1.8;
const rad = (deg: number) => (deg * Math.PI) / 180;

/** Gas law at constant volume on absolute pressure (check-values §6), in whatever pressure unit `atm` is given in. */
const gas = (gauge: number, t1K: number, t2K: number, atm: number) => ((gauge + atm) * t2K) / t1K - atm;
/** ISA troposphere pressure in kPa at geopotential altitude h metres, constants as check-values §6 lists them. */
const isaKpa = (h: number) => ATM_KPA * (1 - (0.0065 * h) / 288.15) ** ((9.80665 * 0.0289644) / (8.31432 * 0.0065));
/** Nominal overall diameter in mm (check-values §1). */
const diameterMm = (width: number, aspect: number, rim: number) => rim * IN_MM + (2 * width * aspect) / 100;

function run(units: StoreUnits, id: string, values: Record<string, string> = {}): string[] {
	const calc = calculatorsFor(units).find((c) => c.id === id);
	if (!calc) throw new Error(`no calculator ${id}`);
	const result = answer(calc, { ...defaultValues(calc), ...values });
	if ('error' in result) throw new Error(result.error);
	return result.lines;
}

function failure(units: StoreUnits, id: string, values: Record<string, string>): string {
	const calc = calculatorsFor(units).find((c) => c.id === id)!;
	const result = answer(calc, { ...defaultValues(calc), ...values });
	return 'error' in result ? result.error : `no error: ${result.lines.join(' / ')}`;
}

/** The SI value an imperial answer carries beside it: "34.06 psi (234.85 kPa) gauge" → "234.85 kPa". */
const beside = (line: string) => /\(([^()]+)\)/.exec(line)?.[1];

describe('the units rule for temperature, altitude and road speed', () => {
	it('follows the store’s length unit until the store settings carry these units', () => {
		expect(impliedUnits(imperial)).toEqual({ temperature: 'F', altitude: 'ft', speed: 'mph' });
		expect(impliedUnits(siUnits)).toEqual({ temperature: 'C', altitude: 'm', speed: 'km/h' });
		// Only length decides: a metric store that inflates in psi still reads °C and metres.
		expect(impliedUnits({ ...siUnits, pressure: 'psi' })).toEqual({ temperature: 'C', altitude: 'm', speed: 'km/h' });
	});
});

describe('fields in the store’s units', () => {
	const labels = (units: StoreUnits) => calculatorsFor(units).flatMap((c) => c.fields.map((f) => f.label));

	it('labels each field with the unit it is read in', () => {
		expect(labels(imperial)).toEqual(
			expect.arrayContaining([
				'Gauge pressure (psi)',
				'Now at (°F)',
				'Set at altitude (ft)',
				'Weight (oz)',
				'Inner (oz)',
				'Adjacent stud centres (in)'
			])
		);
		expect(labels(siUnits)).toEqual(
			expect.arrayContaining([
				'Gauge pressure (kPa)',
				'Now at (°C)',
				'Set at altitude (m)',
				'Weight (g)',
				'Inner (g)',
				'Adjacent stud centres (mm)'
			])
		);
		expect(labels(barStore)).toContain('Gauge pressure (bar)');
		expect(labels(imperial).join(' ')).not.toMatch(/kPa|°C|\(g\)|\(mm\)|\(m\)/);
	});

	it('answers from its defaults in every unit system, with the same calculators in the same order', () => {
		const ids = calculatorsFor(siUnits).map((c) => c.id);
		for (const units of [siUnits, imperial, barStore]) {
			expect(calculatorsFor(units).map((c) => c.id)).toEqual(ids);
			for (const c of calculatorsFor(units)) expect(answer(c, defaultValues(c)), `${c.id}`).toHaveProperty('lines');
		}
	});

	it('starts from round figures in the store’s own units', () => {
		const pressure = (units: StoreUnits) => defaultValues(calculatorsFor(units)[0]).pressure;
		expect(pressure(siUnits)).toBe('240');
		expect(pressure(imperial)).toBe('35');
		expect(pressure(barStore)).toBe('2.4');
	});
});

describe('pressure at another temperature', () => {
	it('gives the SI check value in kPa alone in an SI store', () => {
		// 240 kPa(g) at 20 °C → 0 °C = 216.71 kPa: exact definition (gas law on absolute pressure), check-values §6.
		expect(run(siUnits, 'pressure-temperature', { pressure: '240', from: '20', to: '0' })).toEqual([
			`${gas(240, kelvinC(20), kelvinC(0), ATM_KPA).toFixed(2)} kPa gauge`
		]);
	});

	it('gives the imperial check value in psi, with kPa beside', () => {
		// 35 psig at 70 °F → 60 °F = 34.062 psig: exact definition (gas law, °F to kelvin), check-values §6.
		const psi = gas(35, kelvinF(70), kelvinF(60), ATM_KPA / PSI_KPA);
		expect(psi.toFixed(2)).toBe('34.06');
		expect(run(imperial, 'pressure-temperature', { pressure: '35', from: '70', to: '60' })).toEqual([
			`${psi.toFixed(2)} psi (${(psi * PSI_KPA).toFixed(2)} kPa) gauge`
		]);
	});

	it('gives the same physical answer in an SI and an imperial store', () => {
		// The SI case above typed in psi and °F (68 °F = 20 °C and 32 °F = 0 °C exactly): exact definitions, §6 and §7.
		const si = run(siUnits, 'pressure-temperature', { pressure: '240', from: '20', to: '0' })[0];
		const usa = run(imperial, 'pressure-temperature', { pressure: String(240 / PSI_KPA), from: '68', to: '32' })[0];
		expect(beside(usa)).toBe(si.replace(' gauge', ''));
		expect(usa).toMatch(new RegExp(`^${(gas(240, kelvinC(20), kelvinC(0), ATM_KPA) / PSI_KPA).toFixed(2)} psi`));
	});

	it('works on absolute pressure, not by scaling the gauge reading', () => {
		// 35 psig at 20 °C → −10 °C (68 °F → 14 °F) is 29.914 psig; scaling the gauge gives 31.42 (check-values §6, §12).
		const line = run(imperial, 'pressure-temperature', { pressure: '35', from: '68', to: '14' })[0];
		expect(line).toMatch(new RegExp(`^${gas(35, kelvinC(20), kelvinC(-10), ATM_KPA / PSI_KPA).toFixed(2)} psi`));
		expect(line).toMatch(/^29\.91 psi/);
	});

	it('reads bar in a store that inflates in bar', () => {
		// 2.4 bar = 240 kPa (1 bar = 100 kPa, exact definition); same case as the SI check value, check-values §6.
		const kpa = gas(240, kelvinC(20), kelvinC(0), ATM_KPA);
		expect(run(barStore, 'pressure-temperature', { pressure: '2.4', from: '20', to: '0' })).toEqual([
			`${(kpa / 100).toFixed(3)} bar (${kpa.toFixed(2)} kPa) gauge`
		]);
	});

	it('explains a reading below absolute zero in the unit it was typed in', () => {
		expect(failure(imperial, 'pressure-temperature', { to: '-500' })).toMatch(/°F is below absolute zero/);
		expect(failure(imperial, 'pressure-temperature', { pressure: '' })).toBe('Gauge pressure must be a number');
	});
});

describe('gauge reading at another altitude', () => {
	it('gives the SI table value', () => {
		// 240 kPa set at sea level reads 251.5 kPa at 1000 m: exact definition (ISA troposphere), check-values §6 table.
		const kpa = 240 + ATM_KPA - isaKpa(1000);
		expect(kpa.toFixed(1)).toBe('251.5');
		expect(run(siUnits, 'pressure-altitude', { pressure: '240', from: '0', to: '1000' })).toEqual([
			`${kpa.toFixed(2)} kPa gauge`
		]);
	});

	it('gives the imperial table value with the altitude in feet', () => {
		// 35 psig set at sea level reads 36.66 psi at 1000 m (1000 / 0.3048 ft): ISA, check-values §6 table.
		const psi = 35 + (ATM_KPA - isaKpa(1000)) / PSI_KPA;
		expect(psi.toFixed(2)).toBe('36.66');
		expect(run(imperial, 'pressure-altitude', { pressure: '35', from: '0', to: String(1000 / FT_M) })).toEqual([
			`${psi.toFixed(2)} psi (${(psi * PSI_KPA).toFixed(2)} kPa) gauge`
		]);
	});

	it('gives the same physical answer in an SI and an imperial store', () => {
		// 5000 ft = 1524 m exactly (1 ft = 0.3048 m, exact definition).
		const si = run(siUnits, 'pressure-altitude', { pressure: '240', from: '0', to: '1524' })[0];
		const usa = run(imperial, 'pressure-altitude', { pressure: String(240 / PSI_KPA), from: '0', to: '5000' })[0];
		expect(beside(usa)).toBe(si.replace(' gauge', ''));
	});
});

describe('weights', () => {
	it('splits the published symmetric case in grams', () => {
		// 60 g at ±30° → W / (2 cos α) = 34.64 g each: exact definition (law of sines), check-values §9.
		const each = (60 / (2 * Math.cos(rad(30)))).toFixed(2);
		expect(each).toBe('34.64');
		expect(run(siUnits, 'weight-split', { weight: '60', deg: '0', a: '330', b: '30' })).toEqual([
			`${each} g at 330°`,
			`${each} g at 30°`
		]);
	});

	it('splits the published asymmetric case in grams', () => {
		// 50 g @10° into 0° and 72° → 46.419 g + 9.129 g: exact definition (law of sines), check-values §9.
		const span = Math.sin(rad(72));
		expect(run(siUnits, 'weight-split', { weight: '50', deg: '10', a: '0', b: '72' })).toEqual([
			`${((50 * Math.sin(rad(62))) / span).toFixed(2)} g at 0°`,
			`${((50 * Math.sin(rad(10))) / span).toFixed(2)} g at 72°`
		]);
	});

	it('splits in ounces with grams beside, the same weight as in grams', () => {
		// 60 g typed as 60 / 28.349523125 oz (1 oz = lb/16, exact definition); the split as above, check-values §9.
		const each = 60 / (2 * Math.cos(rad(30)));
		const lines = run(imperial, 'weight-split', { weight: String(60 / OZ_G), deg: '0', a: '330', b: '30' });
		expect(lines).toEqual([
			`${(each / OZ_G).toFixed(2)} oz (${each.toFixed(2)} g) at 330°`,
			`${(each / OZ_G).toFixed(2)} oz (${each.toFixed(2)} g) at 30°`
		]);
		expect(beside(lines[0])).toBe(run(siUnits, 'weight-split', { weight: '60' })[0].replace(' at 330°', ''));
	});

	it('gives the same static and couple in an ounce store as in a gram store', () => {
		// The published row above typed in ounces (30 g and 10 g ÷ 28.349523125, exact definition): grams beside match.
		const si = run(siUnits, 'static-couple', { inner: '30', innerDeg: '0', outer: '10', outerDeg: '90' });
		const usa = run(imperial, 'static-couple', {
			inner: String(30 / OZ_G),
			innerDeg: '0',
			outer: String(10 / OZ_G),
			outerDeg: '90'
		});
		expect(usa.map(beside)).toEqual(si.map((line) => /(\S+ g)/.exec(line)?.[1]));
		expect(usa[0]).toBe(
			`static ${(Math.hypot(30, 10) / OZ_G).toFixed(2)} oz (${Math.hypot(30, 10).toFixed(2)} g) at 18°`
		);
	});

	it('gives static and couple for the published two-plane row, in grams and in ounces', () => {
		// 30 g @0° + 10 g @90° → static 31.623 g @18.43°, couple 15.811 g @161.57° (half-difference): check-values §9.
		const staticG = Math.hypot(30, 10);
		const coupleG = Math.hypot(15, 5);
		expect(run(siUnits, 'static-couple', { inner: '30', innerDeg: '0', outer: '10', outerDeg: '90' })).toEqual([
			`static ${staticG.toFixed(2)} g at 18°`,
			`couple ${coupleG.toFixed(2)} g at 162° (outer − inner) / 2`
		]);
		// The same row scaled to 3 oz and 1 oz: the vector algebra is linear (exact definition).
		expect(run(imperial, 'static-couple', { inner: '3', innerDeg: '0', outer: '1', outerDeg: '90' })).toEqual([
			`static ${(staticG / 10).toFixed(2)} oz (${((staticG / 10) * OZ_G).toFixed(2)} g) at 18°`,
			`couple ${(coupleG / 10).toFixed(2)} oz (${((coupleG / 10) * OZ_G).toFixed(2)} g) at 162° (outer − inner) / 2`
		]);
	});
});

describe('lengths', () => {
	const from = diameterMm(225, 60, 16);
	const to = diameterMm(235, 55, 17);

	it('compares two sizes with the diameter change in mm', () => {
		// 225/60R16 → 235/55R17: +13.90 mm (+2.055 %), 100 km/h indicated = 102.05 true: check-values §1, computed.
		expect(run(siUnits, 'tire-compare', { from: '225/60R16', to: '235/55R17' })).toEqual([
			`diameter +${(to - from).toFixed(2)} mm, +${((to / from - 1) * 100).toFixed(3)} %`,
			`speedometer shows 100 km/h at a true ${((100 * to) / from).toFixed(2)} km/h`
		]);
	});

	it('compares two sizes in inches and mph, with mm and km/h beside', () => {
		// Same case, 1 in = 25.4 mm and the speedometer ratio D_new/D_old at 60 mph: check-values §1, computed.
		expect(run(imperial, 'tire-compare', { from: '225/60R16', to: '235/55R17' })).toEqual([
			`diameter +${((to - from) / IN_MM).toFixed(3)} in (+${(to - from).toFixed(2)} mm), +${((to / from - 1) * 100).toFixed(3)} %`,
			`speedometer shows 60 mph at a true ${((60 * to) / from).toFixed(2)} mph (100 km/h at ${((100 * to) / from).toFixed(2)} km/h)`
		]);
		// 225/60R16 → 215/45R17: −51.10 mm (−7.555 %): check-values §1, computed.
		const smaller = diameterMm(215, 45, 17) - from;
		expect(run(imperial, 'tire-compare', { from: '225/60R16', to: '215/45R17' })[0]).toBe(
			`diameter ${(smaller / IN_MM).toFixed(3)} in (${smaller.toFixed(2)} mm), ${((diameterMm(215, 45, 17) / from - 1) * 100).toFixed(3)} %`
		);
	});

	it('finds the bolt circle from the stud spacing in mm and in inches', () => {
		// s = 67.18 mm, 5 studs → PCD 114.29 mm (s / sin 36°): check-values §8 inverse check, exact chord geometry.
		const pcd = 67.18 / Math.sin(rad(36));
		expect(pcd.toFixed(2)).toBe('114.29');
		expect(run(siUnits, 'bolt-circle', { spacing: '67.18', n: '5' })).toEqual([`bolt circle ${pcd.toFixed(2)} mm`]);
		// 5 × 4.5 in (= 5 × 114.3 mm): s = 4.5 · sin 36° in, typed to four places; exact chord geometry, check-values §8.
		const spacingIn = (4.5 * Math.sin(rad(36))).toFixed(4);
		const pcdIn = Number(spacingIn) / Math.sin(rad(36));
		expect(run(imperial, 'bolt-circle', { spacing: spacingIn, n: '5' })).toEqual([
			`bolt circle ${pcdIn.toFixed(3)} in (${(pcdIn * IN_MM).toFixed(2)} mm)`
		]);
		expect(pcdIn.toFixed(3)).toBe('4.500');
		expect((pcdIn * IN_MM).toFixed(2)).toBe('114.30');
		expect(run(imperial, 'bolt-circle', { spacing: String(67.18 / IN_MM), n: '5' })).toEqual([
			`bolt circle ${(pcd / IN_MM).toFixed(3)} in (${pcd.toFixed(2)} mm)`
		]);
	});
});

describe('figures the trade reads in fixed units', () => {
	it('gives load index and speed symbol in kg and lb, km/h and mph, whatever the store’s units', () => {
		// LI 91 = 615 kg, lb = kg / 0.45359237 rounded; H = 210 km/h, mph = km/h / 1.609344 rounded:
		// public copies of the tables that agree, check-values §2 [2nd].
		const lines = [`615 kg (${Math.round(615 / LB_KG)} lb) per tire`, `210 km/h (${Math.round(210 / 1.609344)} mph)`];
		expect(run(siUnits, 'load-speed', { li: '91', ss: 'H' })).toEqual(lines);
		expect(run(imperial, 'load-speed', { li: '91', ss: 'H' })).toEqual(lines);
	});

	it('reads the DOT date code the same way in every store', () => {
		// 0109 = the week Sun 4 Jan – Sat 10 Jan 2009: 49 CFR 574.5 example, check-values §3.
		expect(run(imperial, 'tire-age', { code: '0109' })[0]).toBe('week 1 of 2009, from 2009-01-04');
		expect(run(siUnits, 'tire-age', { code: '0109' })[0]).toBe('week 1 of 2009, from 2009-01-04');
	});
});

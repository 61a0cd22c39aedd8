// Each calculator gives a published (or exactly computed) check value through the console, by keyboard, in the demo
// store's units. Sources as in ../shared/reference/check-values.md; the expected values are worked out here, not pasted.
import { expect, test, type Page } from '@playwright/test';
import { calculatorsFor } from '../../src/lib/console/calculators';
import type { StoreUnits } from '../../src/lib/schemas/floor';
import { openConsole } from '../support/console';

/** The units seeds/lib/reference.ts gives the demo store, which these tests sign in to. */
const demoUnits: StoreUnits = {
	pressure: 'psi',
	mass: 'oz',
	torque: 'lbf.ft',
	length: 'in',
	tread: 'in32',
	force: 'lbf'
};
const calculators = calculatorsFor(demoUnits);

// Exact definitions (check-values §7): 1 in = 25.4 mm, 1 ft = 0.3048 m, 1 lb = 0.453 592 37 kg, g_n = 9.806 65 m/s²,
// 1 oz = lb/16, 1 atm = 101.325 kPa, K = (°F + 459.67)/1.8.
const IN_MM = 25.4;
const LB_KG = 0.45359237;
const OZ_G = (LB_KG * 1000) / 16;
const PSI_KPA = (LB_KG * 9.80665) / (IN_MM / 1000) ** 2 / 1000;
const ATM_KPA = 101.325;
const rad = (deg: number) => (deg * Math.PI) / 180;
const kelvinF = (f: number) => (f + 459.67) / 1.8;
/** ISA troposphere pressure in kPa at h metres, constants as check-values §6 lists them. */
const isaKpa = (h: number) => ATM_KPA * (1 - (0.0065 * h) / 288.15) ** ((9.80665 * 0.0289644) / (8.31432 * 0.0065));
/** "34.06 psi (234.85 kPa)": the store's unit with the SI value beside, as the console shows an answer. */
const psi = (value: number) => `${value.toFixed(2)} psi (${(value * PSI_KPA).toFixed(2)} kPa)`;
const oz = (grams: number) => `${(grams / OZ_G).toFixed(2)} oz (${grams.toFixed(2)} g)`;

// 35 psig at 70 °F → 60 °F, gas law on absolute pressure.
const coolPsi = (35 + ATM_KPA / PSI_KPA) * (kelvinF(60) / kelvinF(70)) - ATM_KPA / PSI_KPA;
// 35 psig set at sea level, read at 1000 m: the air inside keeps its absolute pressure.
const altitudePsi = 35 + (ATM_KPA - isaKpa(1000)) / PSI_KPA;
// 60 g split at ±30°: W / (2 cos α) each.
const splitG = 60 / (2 * Math.cos(rad(30)));
// 225/60R16 → 235/55R17: D = rim × 25.4 + 2 × width × aspect / 100.
const fromMm = 16 * IN_MM + (2 * 225 * 60) / 100;
const toMm = 17 * IN_MM + (2 * 235 * 55) / 100;
// 5 × 4.5 in (= 5 × 114.3 mm): adjacent studs 4.5 · sin 36° in apart, typed to four places.
const spacingIn = (4.5 * Math.sin(rad(36))).toFixed(4);
const pcdIn = Number(spacingIn) / Math.sin(rad(36));

const cases: { id: string; values: Record<string, string>; expect: string[]; source: string }[] = [
	{
		id: 'pressure-temperature',
		values: { pressure: '35', from: '70', to: '60' },
		expect: [`${psi(coolPsi)} gauge`],
		source: 'exact definition (ideal gas at constant volume, °F to kelvin); check-values §6 lists 34.062 psig'
	},
	{
		id: 'pressure-altitude',
		values: { pressure: '35', from: '0', to: String(1000 / 0.3048) },
		expect: [`${psi(altitudePsi)} gauge`],
		source: 'exact definition (ISA troposphere, ISO 2533); check-values §6 table: 35 psig reads 36.66 at 1000 m'
	},
	{
		id: 'weight-split',
		// 60 g typed in ounces, so the grams beside are the published figure.
		values: { weight: String(60 / OZ_G), deg: '0', a: '330', b: '30' },
		expect: [`${oz(splitG)} at 330°`, `${oz(splitG)} at 30°`],
		source: 'exact definition (law of sines); check-values §9: 60 g at ±30° → 34.64 g each'
	},
	{
		id: 'static-couple',
		// 30 g @0° and 10 g @90° typed in ounces.
		values: { inner: String(30 / OZ_G), innerDeg: '0', outer: String(10 / OZ_G), outerDeg: '90' },
		expect: [`static ${oz(Math.hypot(30, 10))} at 18°`, `couple ${oz(Math.hypot(15, 5))} at 162° (outer − inner) / 2`],
		source:
			'exact definition with the stated convention; check-values §9: static 31.623 g @18.43°, couple 15.811 g @161.57°'
	},
	{
		id: 'tire-compare',
		values: { from: '225/60R16', to: '235/55R17' },
		expect: [
			`+${((toMm - fromMm) / IN_MM).toFixed(3)} in (+${(toMm - fromMm).toFixed(2)} mm)`,
			`+${((toMm / fromMm - 1) * 100).toFixed(3)} %`,
			`60 mph at a true ${((60 * toMm) / fromMm).toFixed(2)} mph`,
			`100 km/h at ${((100 * toMm) / fromMm).toFixed(2)} km/h`
		],
		source: 'textbook size formulas, values computed; check-values §1: +13.90 mm, +2.055 %, 102.05 km/h'
	},
	{
		id: 'bolt-circle',
		values: { spacing: spacingIn, n: '5' },
		expect: [`bolt circle ${pcdIn.toFixed(3)} in (${(pcdIn * IN_MM).toFixed(2)} mm)`],
		source: 'exact chord geometry s = PCD·sin(180°/n); check-values §8 (5 × 114.3)'
	},
	{
		id: 'load-speed',
		values: { li: '91', ss: 'H' },
		expect: ['615 kg', `${Math.round(615 / LB_KG)} lb`, '210 km/h', `${Math.round(210 / 1.609344)} mph`],
		source: 'load index and speed symbol tables, public copies that agree (check-values §2, [2nd])'
	},
	{
		id: 'tire-age',
		values: { code: '0109' },
		expect: ['week 1 of 2009, from 2009-01-04'],
		source: '49 CFR 574.5 example: 0109 = the week Sun 4 Jan – Sat 10 Jan 2009 (check-values §3)'
	},
	{
		id: 'pacing',
		values: { min: '60', done: '4', total: '8', target: '12' },
		// 4 wheels × 12 min earned − 60 min spent = −12: 12 minutes behind; a 12 min/wheel target is common practice.
		expect: ['12 min behind target', '5.0 wheels expected by now'],
		source: 'arithmetic from the definition; the target itself is common practice, no source'
	}
];

async function openCalculators(page: Page) {
	await openConsole(page, 'tech');
	await page.keyboard.press('c');
	await expect(page.getByTestId('calculator-pick')).toBeFocused();
}

test('each calculator gives its check value through the console, in the store’s units', async ({ page }) => {
	await openCalculators(page);
	expect(cases.map((c) => c.id).sort(), 'one case per calculator').toEqual(calculators.map((c) => c.id).sort());
	for (const c of cases) {
		const index = calculators.findIndex((x) => x.id === c.id);
		await page.getByTestId('calculator-pick').selectOption(String(index));
		for (const field of calculators[index].fields) {
			if (c.values[field.name] === undefined) continue;
			// The labels carry the demo store's units ("Gauge pressure (psi)"), so a console left in SI fails here.
			await page.getByLabel(field.label, { exact: true }).fill(c.values[field.name]);
		}
		for (const text of c.expect)
			await expect(page.getByTestId('calculator-answer'), `${c.id} (${c.source})`).toContainText(text);
	}
});

test('a calculator explains bad input instead of answering', async ({ page }) => {
	await openCalculators(page);
	await page.getByTestId('calculator-pick').selectOption(String(calculators.findIndex((x) => x.id === 'tire-compare')));
	await page.getByLabel('New size', { exact: true }).fill('235/99R17');
	await expect(page.getByTestId('calculator-answer')).toContainText('✕');
	await expect(page.getByTestId('calculator-answer')).toContainText(/[Aa]spect ratio/);
});

// Each calculator gives a published (or exactly computed) check value through the console, by keyboard.
// Sources as in ../shared/reference/check-values.md; the expected values are worked out here, not pasted.
import { expect, test, type Page } from '@playwright/test';
import { calculators } from '../../src/lib/console/calculators';
import { openConsole } from '../support/console';

const rad = (deg: number) => (deg * Math.PI) / 180;

const cases: { id: string; values: Record<string, string>; expect: string[]; source: string }[] = [
	{
		id: 'pressure-temperature',
		values: { kpa: '240', from: '20', to: '0' },
		// Gas law on absolute pressure: (240 + 101.325) × 273.15 / 293.15 − 101.325 = 216.71 kPa.
		expect: [`${(((240 + 101.325) * 273.15) / 293.15 - 101.325).toFixed(2)} kPa`],
		source: 'exact definition (ideal gas at constant volume); check-values §6 lists 216.71 kPa'
	},
	{
		id: 'weight-split',
		values: { g: '30', deg: '0', a: '330', b: '30' },
		expect: [
			`${(30 / (2 * Math.cos(rad(30)))).toFixed(2)} g at 330°`,
			`${(30 / (2 * Math.cos(rad(30)))).toFixed(2)} g at 30°`
		],
		source: 'exact definition (vector sum); check-values §9'
	},
	{
		id: 'static-couple',
		values: { ig: '20', id: '0', og: '20', od: '180' },
		// Equal and opposite: no static part; couple = (outer − inner) / 2 = 20 g at 180°.
		expect: ['static 0.00 g', 'couple 20.00 g at 180°'],
		source: 'exact definition with the stated convention; check-values §9'
	},
	{
		id: 'tire-compare',
		values: { from: '225/60R16', to: '235/55R17' },
		// D = rim × 25.4 + 2 × width × aspect / 100: 676.40 mm → 690.30 mm.
		expect: ['+13.90 mm', `+${((690.3 / 676.4 - 1) * 100).toFixed(3)} %`, `${((100 * 690.3) / 676.4).toFixed(2)} km/h`],
		source: 'textbook size formulas, values computed; check-values §1'
	},
	{
		id: 'bolt-circle',
		values: { s: (114.3 * Math.sin(rad(36))).toFixed(4), n: '5' },
		expect: ['bolt circle 114.30 mm'],
		source: 'exact chord geometry s = PCD·sin(180°/n); check-values §8'
	},
	{
		id: 'load-speed',
		values: { li: '91', ss: 'H' },
		expect: ['615 kg', `${Math.round(615 / 0.45359237)} lb`, '210 km/h', `${Math.round(210 / 1.609344)} mph`],
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

test('each calculator gives its check value through the console', async ({ page }) => {
	await openCalculators(page);
	for (const c of cases) {
		const index = calculators.findIndex((x) => x.id === c.id);
		expect(index, c.id).toBeGreaterThanOrEqual(0);
		await page.getByTestId('calculator-pick').selectOption(String(index));
		const calc = calculators[index];
		for (const field of calc.fields) {
			if (c.values[field.name] === undefined) continue;
			const input = page.getByLabel(field.label, { exact: true });
			await input.fill(c.values[field.name]);
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

// The command palette finds what a writer types in a hurry: a vehicle from a misspelt, out-of-order query, a customer
// by a phone fragment (server search), and a job by its number; Enter acts on the pick.
import { expect, test, type Page } from '@playwright/test';
import { openConsole } from '../support/console';
import { withClient } from '../support/database';

async function search(page: Page, query: string) {
	await page.keyboard.press('/');
	const input = page.getByPlaceholder(/Job number, name, phone/);
	await expect(input).toBeFocused();
	await input.pressSequentially(query, { delay: 20 });
}

/** Two slips of a hurried writer: neighbouring letters swapped, and a letter dropped. */
const swapped = (word: string) => {
	const w = word.toLowerCase();
	return w.length > 3 ? w[0] + w[2] + w[1] + w.slice(3) : w;
};
const dropped = (word: string) => {
	const w = word.toLowerCase();
	return w.length > 4 ? w.slice(0, -2) + w.slice(-1) : w;
};

test('a misspelt, out-of-order vehicle query finds the vehicle and shows its wheel facts', async ({ page }) => {
	const v = (
		await withClient((c) =>
			c.query(
				`SELECT id, make, model, year_from, year_to, trim, torque_nm, (SELECT units->>'torque' FROM stores WHERE slug = 'demo') AS torque_unit FROM vehicles WHERE length(model) >= 4 ORDER BY id LIMIT 1`
			)
		)
	).rows[0];
	await openConsole(page, 'writer');
	await search(page, `${swapped(v.model)} ${dropped(v.make)} ${v.year_from}`);
	await expect(page.locator(`[data-result="vehicle:${v.id}"]`)).toBeVisible();
	const vehicles = await page
		.locator('[data-result^="vehicle:"]')
		.evaluateAll((els) => els.map((e) => e.getAttribute('data-result')));
	expect(vehicles.slice(0, 3)).toContain(`vehicle:${v.id}`);
	await page.locator(`[data-result="vehicle:${v.id}"]`).click();
	await expect(page.getByTestId('vehicle-facts')).toContainText(`${v.make} ${v.model}`);
	await expect(page.getByTestId('vehicle-facts')).toContainText('not for service use');
	// In the store's torque unit, with the stored N·m beside it (1 lbf·ft = 1.3558179483314004 N·m, exact definition).
	const nm = Number(v.torque_nm);
	const expected =
		v.torque_unit === 'lbf.ft'
			? `${(nm / 1.3558179483314004).toFixed(0)} lbf·ft (${nm.toFixed(0)} N·m)`
			: `${nm.toFixed(0)} N·m`;
	await expect(page.getByTestId('torque')).toContainText(expected);
});

test('a phone fragment finds the customer through the server search', async ({ page }) => {
	// A customer whose last eight phone digits no other demo customer shares, so the fragment names one person.
	const c = (
		await withClient((db) =>
			db.query(`SELECT c.id, c.name, c.phone FROM customers c JOIN stores s ON s.id = c.store_id
			           WHERE s.slug = 'demo' AND length(regexp_replace(c.phone, '\\D', '', 'g')) >= 8
			             AND (SELECT count(*) FROM customers o WHERE o.store_id = c.store_id
			                   AND right(regexp_replace(o.phone, '\\D', '', 'g'), 8) = right(regexp_replace(c.phone, '\\D', '', 'g'), 8)) = 1
			           ORDER BY c.id LIMIT 1`)
		)
	).rows[0];
	expect(c, 'the demo data has a customer with a distinct phone number').toBeTruthy();
	const fragment = c.phone.replace(/\D/g, '').slice(-8);
	await openConsole(page, 'writer');
	await search(page, fragment);
	await expect(page.locator(`[data-result="customer:${c.id}"]`)).toBeVisible();
	await page.locator(`[data-result="customer:${c.id}"]`).click();
	await expect(page.getByTestId('focus-customer')).toHaveText(c.name);
});

test('a job number finds the job, and Enter selects it in the console', async ({ page }) => {
	await openConsole(page, 'writer');
	const number = await page.locator('[aria-label="Waiting line"] li').first().getAttribute('data-job');
	await search(page, number!);
	await expect(page.locator('[data-result^="job:"]').first()).toContainText(`#${number}`);
	await page.keyboard.press('Enter');
	await expect(page.getByTestId('focus-job')).toHaveText(`Job #${number}`);
});

// Intake by keyboard: a returning customer's job in at most 15 keystrokes (counted), seen in the database and on a
// second signed-in screen; a new customer and vehicle; bad input shows field errors and saves nothing.
import { expect, test } from '@playwright/test';
import { consoleScreen } from '../support/console';
import { withClient } from '../support/database';

const jobCount = async () =>
	Number(
		(
			await withClient((c) =>
				c.query(`SELECT count(*) FROM jobs j JOIN stores s ON s.id = j.store_id WHERE s.slug = 'demo'`)
			)
		).rows[0].count
	);

test('a returning customer’s job takes at most 15 keystrokes and reaches every screen', async ({ browser }) => {
	// A demo customer with a plate no other vehicle shares.
	const { rows } = await withClient((c) =>
		c.query(`SELECT c.id, c.name, cv.id AS cv, cv.plate FROM customer_vehicles cv JOIN customers c ON c.id = cv.customer_id
		          JOIN stores s ON s.id = c.store_id WHERE s.slug = 'demo' AND cv.plate <> ''
		            AND (SELECT count(*) FROM customer_vehicles o WHERE o.plate = cv.plate) = 1 ORDER BY cv.id LIMIT 1`)
	);
	const target = rows[0];
	const writer = await consoleScreen(browser, 'writer');
	const lead = await consoleScreen(browser, 'lead');
	let keystrokes = 0;
	const press = async (key: string) => {
		keystrokes++;
		await writer.keyboard.press(key);
	};

	await press('n');
	await expect(writer.getByLabel(/Customer: phone, plate or name/)).toBeFocused();
	for (const ch of target.plate.replace(/\s/g, '').toLowerCase()) await press(ch);
	await expect(writer.getByTestId('intake-customers')).toContainText(target.name);
	await press('Enter');
	await expect(writer.getByTestId('intake-customer')).toContainText(target.name);
	await press('m'); // mount and balance
	await expect(writer.locator('[data-service="mount-balance"]')).toHaveAttribute('data-on', 'true');
	await press('Control+Enter');

	await expect(writer.getByTestId('saved')).toBeVisible();
	expect(keystrokes).toBeLessThanOrEqual(15);
	const number = Number((await writer.getByTestId('saved').textContent())!.match(/#(\d+)/)![1]);
	const job = await withClient((c) =>
		c.query(
			`SELECT j.customer_id, j.customer_vehicle_id, j.kind, array_agg(sv.code) AS services,
			        (SELECT count(*) FROM wheels w WHERE w.job_id = j.id) AS wheels
			   FROM jobs j JOIN stores s ON s.id = j.store_id LEFT JOIN job_services js ON js.job_id = j.id
			   LEFT JOIN services sv ON sv.id = js.service_id WHERE s.slug = 'demo' AND j.number = $1 GROUP BY j.id`,
			[number]
		)
	);
	expect(job.rows[0]).toMatchObject({
		customer_id: target.id,
		customer_vehicle_id: target.cv,
		kind: 'waiter',
		services: ['mount-balance']
	});
	expect(Number(job.rows[0].wheels)).toBe(4);
	await expect(lead.locator(`[aria-label="Waiting line"] li[data-job="${number}"]`)).toBeVisible({ timeout: 2_000 });
});

test('a new customer and vehicle through intake', async ({ browser }) => {
	const writer = await consoleScreen(browser, 'writer');
	const vehicle = (await withClient((c) => c.query(`SELECT id, make, model FROM vehicles ORDER BY id DESC LIMIT 1`)))
		.rows[0];
	await writer.keyboard.press('n');
	await writer.keyboard.type('Invented Newcomer');
	await writer.keyboard.press('Tab');
	await expect(writer.getByLabel('Name')).toHaveValue('Invented Newcomer');
	await writer.getByLabel('Phone').fill('204-555-0177');
	await writer.getByLabel('Phone').press('Enter');
	await writer.keyboard.press('v');
	await writer.keyboard.type(`${vehicle.make} ${vehicle.model}`);
	await writer.keyboard.press('Enter');
	await writer.keyboard.press('d');
	await writer.keyboard.press('Control+Enter');
	await expect(writer.getByTestId('saved')).toBeVisible();
	const number = Number((await writer.getByTestId('saved').textContent())!.match(/#(\d+)/)![1]);
	const row = await withClient((c) =>
		c.query(
			`SELECT c.name, c.phone, j.vehicle_id, j.kind FROM jobs j JOIN customers c ON c.id = j.customer_id
			   JOIN stores s ON s.id = j.store_id WHERE s.slug = 'demo' AND j.number = $1`,
			[number]
		)
	);
	expect(row.rows[0]).toMatchObject({
		name: 'Invented Newcomer',
		phone: '204-555-0177',
		vehicle_id: vehicle.id,
		kind: 'drop_off'
	});
});

test('bad input shows the field errors and saves nothing', async ({ browser }) => {
	const writer = await consoleScreen(browser, 'writer');
	const before = await jobCount();
	await writer.keyboard.press('n');
	await writer.keyboard.press('Tab'); // a new customer, but no name typed
	await writer.getByLabel('Phone').fill('x'.repeat(60));
	await writer.getByLabel('Phone').press('Control+Enter');
	await expect(writer.getByRole('alert')).toContainText('Check the fields');
	await expect(writer.getByText('✕ Enter the customer’s name')).toBeVisible();
	await expect(writer.getByText(/The phone number is too long/)).toBeVisible();
	expect(await jobCount()).toBe(before);
});

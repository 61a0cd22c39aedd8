// The manager's pages: staff, bays, services and settings, each in a store of its own so the demo floor and the
// other tests are not disturbed. Changes are made through the pages' forms as a manager would, and read back from
// the database and from the other people's screens.
import { expect, test, type Browser, type Page } from '@playwright/test';
import { createTestStore, newJob, type TestStore } from '../support/store';
import { submitSignIn } from '../support/console';
import { withClient } from '../support/database';

type Person = keyof TestStore['people'];

async function screen(browser: Browser, store: TestStore, who: Person): Promise<Page> {
	const page = await (await browser.newContext()).newPage();
	const { email, password } = store.people[who];
	await submitSignIn(page, email, password);
	await expect(page.getByTestId('connection')).toHaveAttribute('data-state', 'live');
	return page;
}

const origin = (page: Page) => ({ origin: new URL(page.url()).origin });

async function one<T = Record<string, unknown>>(sql: string, params: unknown[] = []): Promise<T> {
	return withClient(async (c) => (await c.query(sql, params)).rows[0] as T);
}

/** The row of a person on the staff page. */
const personRow = (page: Page, email: string) => page.locator(`tr[data-person="${email}"]`);

test('a disabled person is refused on their next request and their open stream closes', async ({ browser }) => {
	const store = await createTestStore(`manage-disable-${Date.now()}`);
	const tech = await screen(browser, store, 'tech2');
	const manager = await screen(browser, store, 'manager');
	await manager.goto('/manage');

	// A manager cannot disable themselves: a clear message, and nothing changes.
	await personRow(manager, store.people.manager.email).getByRole('button', { name: 'Disable' }).click();
	await expect(manager.getByRole('status').filter({ hasText: 'cannot disable your own account' })).toBeVisible();
	expect((await one('SELECT active FROM users WHERE id = $1', [store.people.manager.id])).active).toBe(true);

	const before = await one<{ session_version: number }>('SELECT session_version FROM users WHERE id = $1', [
		store.people.tech2.id
	]);
	await personRow(manager, store.people.tech2.email).getByRole('button', { name: 'Disable' }).click();
	await expect(personRow(manager, store.people.tech2.email)).toContainText('disabled');
	const after = await one<{ active: boolean; session_version: number }>(
		'SELECT active, session_version FROM users WHERE id = $1',
		[store.people.tech2.id]
	);
	expect(after).toEqual({ active: false, session_version: before.session_version + 1 });
	const audit = await one(
		`SELECT user_id, action FROM audit WHERE entity = 'user' AND entity_id = $1 ORDER BY id DESC LIMIT 1`,
		[store.people.tech2.id]
	);
	expect(audit).toEqual({ user_id: store.people.manager.id, action: 'disable' });

	// The stream the technician's console holds is closed by the server (sessions are checked every 5 s).
	await expect(tech.getByTestId('connection')).toHaveAttribute('data-state', 'signed_out', { timeout: 12_000 });
	expect((await tech.request.get('/api/board')).status()).toBe(401);
	await tech.goto('/');
	await expect(tech).toHaveURL(/\/signin/);

	// Enabled again, the person signs in afresh.
	await personRow(manager, store.people.tech2.email).getByRole('button', { name: 'Enable' }).click();
	await expect(personRow(manager, store.people.tech2.email)).toContainText('active');
	await submitSignIn(tech, store.people.tech2.email, store.people.tech2.password);
	await expect(tech.getByTestId('connection')).toHaveAttribute('data-state', 'live');
});

test('a lead demoted to writer can no longer move wheels; a manager cannot demote themselves', async ({ browser }) => {
	const store = await createTestStore(`manage-demote-${Date.now()}`);
	const lead = await screen(browser, store, 'lead');
	const made = await lead.request.post('/api/jobs', { data: newJob(), headers: origin(lead) });
	expect(made.status()).toBe(201);
	const job = (await made.json()) as { wheels: { id: number; version: number }[] };
	const move = (wheel: { id: number; version: number }) =>
		lead.request.post('/api/wheels/move', {
			data: { wheels: [{ id: wheel.id, version: wheel.version }], bayId: store.bays[1].id },
			headers: origin(lead)
		});
	expect((await move(job.wheels[0])).status()).toBe(200);

	const manager = await screen(browser, store, 'manager');
	await manager.goto('/manage');
	const mine = personRow(manager, store.people.manager.email);
	await mine.getByRole('combobox').selectOption('lead');
	await mine.getByRole('button', { name: 'Change' }).click();
	await expect(manager.getByRole('status').filter({ hasText: 'cannot take the manager role' })).toBeVisible();
	expect((await one('SELECT role FROM users WHERE id = $1', [store.people.manager.id])).role).toBe('manager');

	const row = personRow(manager, store.people.lead.email);
	await row.getByRole('combobox').selectOption('writer');
	await row.getByRole('button', { name: 'Change' }).click();
	await expect(manager.getByRole('status').filter({ hasText: 'is now service writer' })).toBeVisible();
	expect((await one('SELECT role FROM users WHERE id = $1', [store.people.lead.id])).role).toBe('writer');

	// Still signed in (a role change ends no session), but the move is now refused.
	expect((await move(job.wheels[1])).status()).toBe(403);
	expect((await lead.request.get('/api/board')).status()).toBe(200);
});

test('a bay taken out of service sends its queued wheels back to waiting, live on another screen', async ({
	browser
}) => {
	const store = await createTestStore(`manage-bays-${Date.now()}`);
	const lead = await screen(browser, store, 'lead');
	const made = await lead.request.post('/api/jobs', { data: newJob(), headers: origin(lead) });
	const job = (await made.json()) as { id: number; number: number; wheels: { id: number; version: number }[] };
	const t2 = store.bays[1];
	const moved = await lead.request.post('/api/wheels/move', {
		data: { wheels: job.wheels.map(({ id, version }) => ({ id, version })), bayId: t2.id },
		headers: origin(lead)
	});
	expect(moved.status()).toBe(200);
	await expect(lead.locator('[data-bay="T2"]')).toContainText(`#${job.number}`);

	const manager = await screen(browser, store, 'manager');
	await manager.goto('/manage/bays');
	const row = manager.locator('tr[data-bay-row="T2"]');
	await expect(row).toContainText('4 queued');
	await row.getByRole('button', { name: 'Take out of service' }).click();
	await expect(manager.getByRole('status').filter({ hasText: '4 queued wheels went back to waiting' })).toBeVisible();

	// The lead's screen shows it without reloading: the lane is out of service and the job waits again.
	await expect(lead.locator('[data-bay="T2"]')).toContainText('out of service');
	await expect(lead.locator('[data-bay="T2"]')).not.toContainText(`#${job.number}`);
	await expect(lead.locator(`[aria-label="Waiting line"] li[data-job="${job.number}"]`)).toBeVisible();
	const rows = await withClient(
		async (c) => (await c.query('SELECT bay_id, queue_position FROM wheels WHERE job_id = $1', [job.id])).rows
	);
	expect(rows).toEqual(job.wheels.map(() => ({ bay_id: null, queue_position: null })));
	const event = await one<{ type: string; payload: { bays: { id: number; active: boolean }[]; wheels: unknown[] } }>(
		`SELECT type, payload FROM events WHERE store_id = $1 ORDER BY id DESC LIMIT 1`,
		[store.id]
	);
	expect(event.type).toBe('bay.out_of_service');
	expect(event.payload.bays).toMatchObject([{ id: t2.id, active: false }]);
	expect(event.payload.wheels).toHaveLength(4);

	// Nothing can be sent there now; back in service, it takes wheels again.
	const refused = await lead.request.post('/api/wheels/move', {
		data: { wheels: [{ id: job.wheels[0].id, version: job.wheels[0].version + 2 }], bayId: t2.id },
		headers: origin(lead)
	});
	expect(refused.status()).toBe(422);
	await manager.locator('tr[data-bay-row="T2"]').getByRole('button', { name: 'Back in service' }).click();
	await expect(lead.locator('[data-bay="T2"]')).not.toContainText('out of service');

	// Reorder: T2 up to first place, seen in the lead's lane order.
	await manager.locator('tr[data-bay-row="T2"]').getByRole('button', { name: 'Move bay T2 up' }).click();
	await expect(manager.locator('tr[data-bay-row]').first()).toHaveAttribute('data-bay-row', 'T2');
	await expect(lead.locator('[data-bay]').first()).toHaveAttribute('data-bay', 'T2');
});

test('bad input shows field errors and saves nothing', async ({ browser }) => {
	const store = await createTestStore(`manage-errors-${Date.now()}`);
	const manager = await screen(browser, store, 'manager');
	const count = async (sql: string, params: unknown[]) => Number((await one<{ n: string }>(sql, params)).n);

	await manager.goto('/manage');
	const add = manager.getByRole('form', { name: 'Add a person' });
	await add.getByLabel('Name', { exact: true }).fill('Invented New Person');
	await add.getByLabel('E-mail').fill('not-an-address');
	await add.getByLabel(/First password/).fill('short');
	await add.getByRole('button', { name: 'Add person' }).click();
	await expect(add).toContainText('Enter an e-mail address');
	await expect(add).toContainText('At least 12 characters');
	await expect(add.getByLabel('Name', { exact: true })).toHaveValue('Invented New Person');
	expect(await count(`SELECT count(*) AS n FROM users WHERE store_id = $1`, [store.id])).toBe(5);

	// An e-mail already in use is refused beside the field.
	await add.getByLabel('E-mail').fill(store.people.tech.email);
	await add.getByLabel(/First password/).fill('a-long-enough-password');
	await add.getByRole('button', { name: 'Add person' }).click();
	await expect(add).toContainText('already uses this e-mail');
	expect(await count(`SELECT count(*) AS n FROM users WHERE store_id = $1`, [store.id])).toBe(5);

	// A good one is added, audited, and can then get a PIN (4–8 digits only).
	const email = `new@${store.slug}.lugline.test`;
	await add.getByLabel('E-mail').fill(email);
	await add.getByLabel(/First password/).fill('a-long-enough-password');
	await add.getByRole('button', { name: 'Add person' }).click();
	await expect(personRow(manager, email)).toBeVisible();
	const pin = personRow(manager, email).getByRole('textbox', { name: /PIN/ });
	await pin.fill('12ab');
	await personRow(manager, email).getByRole('button', { name: 'Set', exact: true }).click();
	await expect(manager.getByText('A PIN is 4 to 8 digits')).toBeVisible();
	expect(await count(`SELECT count(*) AS n FROM users WHERE email = $1 AND pin_hash IS NOT NULL`, [email])).toBe(0);
	await pin.fill('4821');
	await personRow(manager, email).getByRole('button', { name: 'Set', exact: true }).click();
	await expect(manager.getByText('PIN is set')).toBeVisible();
	const stored = await one<{ pin_hash: string }>(`SELECT pin_hash FROM users WHERE email = $1`, [email]);
	expect(stored.pin_hash).toMatch(/^\$argon2id\$/);

	await manager.goto('/manage/bays');
	const bay = manager.getByRole('form', { name: 'Add a bay' });
	await bay.getByLabel(/Code/).fill('B 9!');
	await bay.getByLabel('Name', { exact: true }).fill('Invented bay');
	await bay.getByRole('button', { name: 'Add bay' }).click();
	await expect(bay).toContainText('Letters, digits and dashes');
	await bay.getByLabel(/Code/).fill('T1');
	await bay.getByRole('button', { name: 'Add bay' }).click();
	await expect(bay).toContainText('Bay T1 already exists');
	expect(await count(`SELECT count(*) AS n FROM bays WHERE store_id = $1`, [store.id])).toBe(4);

	await manager.goto('/manage/services');
	const service = manager.getByRole('form', { name: 'Add a service' });
	await service.getByLabel('Code', { exact: true }).fill('tpms-reset');
	await service.getByLabel('Name', { exact: true }).fill('TPMS relearn');
	await service.getByLabel('Standard minutes').fill('lots');
	await service.getByRole('button', { name: 'Add service' }).click();
	await expect(service).toContainText('Enter a number of minutes');
	expect(await count(`SELECT count(*) AS n FROM services WHERE store_id = $1`, [store.id])).toBe(2);
	await service.getByLabel('Standard minutes').fill('8');
	await service.getByLabel('balancing included').check();
	await service.getByRole('button', { name: 'Add service' }).click();
	await expect(manager.getByText('Service TPMS relearn added')).toBeVisible();
	await expect(manager.getByRole('form', { name: 'Service tpms-reset' })).toBeVisible();
	expect(
		await one(`SELECT standard_minutes::float AS m, needs_balance FROM services WHERE store_id = $1 AND code = $2`, [
			store.id,
			'tpms-reset'
		])
	).toEqual({ m: 8, needs_balance: true });

	await manager.goto('/manage/settings');
	await manager.getByLabel('Time zone').fill('Mars/Olympus_Mons');
	await manager.getByLabel(/Target minutes per wheel/).fill('0');
	await manager.getByRole('button', { name: 'Save settings' }).click();
	await expect(manager.getByText('Pick a time zone from the list')).toBeVisible();
	await expect(manager.getByText('More than zero')).toBeVisible();
	expect(await one(`SELECT timezone, target_min_per_wheel::float AS t FROM stores WHERE id = $1`, [store.id])).toEqual({
		timezone: 'UTC',
		t: 12
	});

	// A good save: the force limit typed in lbf is kept in N, the weight increment typed in oz kept in g.
	await manager.getByLabel('Time zone').fill('America/Chicago');
	await manager.getByLabel(/Target minutes per wheel/).fill('10');
	await manager.getByLabel(/Force-variation limit/).fill('30');
	await manager.getByLabel(/Weight stock increment/).fill('0.25');
	await manager.getByRole('button', { name: 'Save settings' }).click();
	await expect(manager.getByText('Settings saved')).toBeVisible();
	const saved = await one<{ timezone: string; t: number; n: number; rules: { incrementG: number } }>(
		`SELECT timezone, target_min_per_wheel::float AS t, force_variation_limit_n::float AS n, weight_rules AS rules
		   FROM stores WHERE id = $1`,
		[store.id]
	);
	expect(saved.timezone).toBe('America/Chicago');
	expect(saved.t).toBe(10);
	// 30 lbf × 4.4482216152605 N/lbf = 133.45 N; 0.25 oz × 28.349523125 g/oz = 7.09 g.
	expect(saved.n).toBeCloseTo(133.45, 2);
	expect(saved.rules.incrementG).toBeCloseTo(7.09, 2);
});

test("the manage pages are in a manager's palette and not in a lead's", async ({ browser }) => {
	const store = await createTestStore(`manage-palette-${Date.now()}`);
	const manager = await screen(browser, store, 'manager');
	await manager.keyboard.press('/');
	const input = manager.getByPlaceholder(/Job number, name, phone/);
	await expect(input).toBeFocused();
	await input.pressSequentially('manage bays', { delay: 20 });
	await expect(manager.locator('[data-result="command:manage-bays"]')).toBeVisible();
	await manager.locator('[data-result="command:manage-bays"]').click();
	await expect(manager).toHaveURL(/\/manage\/bays$/);
	await expect(manager.getByRole('heading', { name: 'Bays' })).toBeVisible();
	// The strip of links reaches the others.
	await manager.getByRole('navigation', { name: 'Manage' }).getByRole('link', { name: 'Settings' }).click();
	await expect(manager.getByRole('heading', { name: 'Store settings' })).toBeVisible();

	const lead = await screen(browser, store, 'lead');
	await lead.keyboard.press('/');
	// "bay" finds the lead's own bay commands (so the search has answered), but not the manager's page.
	await lead.getByPlaceholder(/Job number, name, phone/).pressSequentially('bay', { delay: 20 });
	await expect(lead.locator('[data-result^="command:"]').first()).toBeVisible();
	await expect(lead.locator('[data-result="command:manage-bays"]')).toHaveCount(0);
});

test('two managers editing the same bay: the second save is refused, not silently applied', async ({ browser }) => {
	const store = await createTestStore(`manage-stale-${Date.now()}`);
	const first = await screen(browser, store, 'manager');
	const second = await (await browser.newContext({ storageState: await first.context().storageState() })).newPage();
	await first.goto('/manage/bays');
	await second.goto('/manage/bays');
	const rename = async (page: Page, name: string) => {
		const row = page.locator('tr[data-bay-row="T1"]');
		await row.getByRole('textbox').fill(name);
		await row.getByRole('button', { name: 'Rename' }).click();
	};
	await rename(first, 'Invented front bay');
	await expect(first.getByText('Renamed to Invented front bay')).toBeVisible();
	await rename(second, 'Invented other name');
	await expect(second.getByText('Someone else changed this')).toBeVisible();
	// The refused form now shows what is stored, to check before trying again.
	await expect(second.locator('tr[data-bay-row="T1"]').getByRole('textbox')).toHaveValue('Invented front bay');
	expect((await one('SELECT name FROM bays WHERE id = $1', [store.bays[0].id])).name).toBe('Invented front bay');
});

// The bay screen: a technician claims it with a PIN, starts a wheel, records it and finishes it, and the lead's
// console sees the wheel done within a second; wrong PINs are refused and slowed; the record refuses impossible
// values with clear messages and keeps every part of a record saved in parts. A store of its own per test.
import { expect, test, type Browser, type Page } from '@playwright/test';
import { hash } from '@node-rs/argon2';
import sharp from 'sharp';
import { createTestStore, newJob, type TestStore } from '../support/store';
import { submitSignIn } from '../support/console';
import { withClient } from '../support/database';
import { LBF_FT_NM, OZ_G, PSI_KPA } from '../../src/lib/calc/units';

const PIN = '2468';

async function storeWithJobInBay(slug: string) {
	const store = await createTestStore(`${slug}-${Date.now()}`, 2);
	const pinHash = await hash(PIN);
	await withClient((c) => c.query('UPDATE users SET pin_hash = $1 WHERE id = $2', [pinHash, store.people.tech.id]));
	return store;
}

async function screen(browser: Browser, store: TestStore, who: keyof TestStore['people']): Promise<Page> {
	const page = await (await browser.newContext()).newPage();
	await submitSignIn(page, store.people[who].email, store.people[who].password);
	await expect(page.getByTestId('connection')).toHaveAttribute('data-state', 'live');
	return page;
}

async function jobInBay(page: Page, store: TestStore) {
	const r = await page.request.post('/api/jobs', { data: newJob(), headers: { origin: new URL(page.url()).origin } });
	expect(r.status()).toBe(201);
	const job = await r.json();
	await withClient((c) =>
		c.query('SELECT lugline_move_wheels($1, NULL, $2::int[], $3::int[], $4, NULL)', [
			store.id,
			job.wheels.map((w: { id: number }) => w.id),
			job.wheels.map((w: { version: number }) => w.version),
			store.bays[0].id
		])
	);
	return job as { id: number; number: number; wheels: { id: number; position: string }[] };
}

test('a technician claims the bay screen, runs a wheel with its record, and the lead sees it done', async ({
	browser
}) => {
	const store = await storeWithJobInBay('bay-run');
	const lead = await screen(browser, store, 'lead');
	const job = await jobInBay(lead, store);
	const first = job.wheels[0];

	const bay = await screen(browser, store, 'tech');
	await bay.goto('/bay/T1');
	await expect(bay.getByTestId('connection')).toHaveAttribute('data-state', 'live');
	await expect(bay.getByTestId('bay-current')).toHaveText(`#${job.number} · ${first.position}`);

	// A wrong PIN is refused in words; the right one claims the screen.
	await bay.keyboard.press('c');
	await bay.locator(`[data-person="${store.people.tech.id}"]`).click();
	await bay.keyboard.type('9999');
	await bay.keyboard.press('Enter');
	await expect(bay.getByRole('alert')).toContainText('That PIN is not right');
	await bay.keyboard.type(PIN);
	await bay.keyboard.press('Enter');
	await expect(bay.getByTestId('claimed-by')).toContainText(`tech of ${store.slug}`);

	// S starts the wheel under the technician who claimed the screen.
	await bay.keyboard.press('s');
	await expect(bay.getByTestId('bay-step')).toContainText('Done');
	await expect
		.poll(
			async () =>
				(await withClient((c) => c.query('SELECT state, tech_id FROM wheels WHERE id = $1', [first.id]))).rows[0]
		)
		.toEqual({ state: 'working', tech_id: store.people.tech.id });

	// R opens the record: tread, DOT code, pressure, a weight and torque in the store's units (a new store's default
	// is imperial: /32 in, psi, oz, lbf·ft), saved with Ctrl+Enter and stored in SI.
	await bay.keyboard.press('r');
	const form = bay.getByRole('form', { name: 'Wheel record' });
	await form.locator('input[name="tread"]').fill('7');
	await form.locator('input[name="dot"]').fill('2319');
	await expect(bay.getByTestId('dot-age')).toContainText('made week 23 of 2019');
	await form.locator('input[name="pressure"]').fill('35');
	await form.getByRole('button', { name: '+ weight' }).click();
	await form.getByLabel('Amount').fill('1');
	await form.getByLabel('Angle (°)').fill('90');
	await form.locator('input[name="torque"]').fill('80');
	await form.locator('input[name="torque"]').press('Control+Enter');
	await expect(bay.getByTestId('record-status')).toContainText('Saved');
	const record = await withClient((c) =>
		c.query(
			`SELECT tread_depth_mm::float AS tread, dot_code, pressure_set_kpa::float AS kpa, weights,
			        torque_applied_nm::float AS torque, recorded_by FROM wheel_records WHERE wheel_id = $1`,
			[first.id]
		)
	);
	// Exact conversion factors (check-values: exact definitions): 1 in = 25.4 mm, 1 psi = 6.894757293168361 kPa,
	// 1 oz = 28.349523125 g, 1 lbf·ft = 1.3558179483314004 N·m; the columns keep 2, 1, exact and 1 decimals.
	expect(record.rows[0]).toEqual({
		tread: Number(((7 / 32) * 25.4).toFixed(2)),
		dot_code: '2319',
		kpa: Number((35 * PSI_KPA).toFixed(1)),
		weights: [{ plane: 'inner', type: 'adhesive', grams: OZ_G, angleDeg: 90 }],
		torque: Number((80 * LBF_FT_NM).toFixed(1)),
		recorded_by: store.people.tech.id
	});

	// The lead's console has the job selected; F on the bay finishes the wheel and the console shows it done.
	await lead.keyboard.press('Shift+Digit1');
	await lead.keyboard.press('ArrowDown');
	await expect(lead.getByTestId('focus-job')).toHaveText(`Job #${job.number}`);
	// → selects the wheel: its record is there for the lead, in the store's units.
	await lead.keyboard.press('ArrowRight');
	await expect(lead.getByTestId('wheel-record')).toContainText('7 /32 in');
	await expect(lead.getByTestId('wheel-record')).toContainText('2319');

	// A photo of the finished work, taken at the bay, is on the lead's screen too.
	const png = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#808080' } })
		.png()
		.toBuffer();
	await bay.locator('[data-kind="finished"]').click();
	await bay
		.locator('input[type="file"][name="photo"]')
		.setInputFiles({ name: 'wheel.png', mimeType: 'image/png', buffer: png });
	await expect(bay.getByTestId('photo-status')).toContainText('Finished work photo added');
	await expect(lead.locator('[data-testid="photos"] img')).toHaveCount(1, { timeout: 2_000 });

	await bay.locator('h1').click();
	await bay.keyboard.press('f');
	await expect(lead.locator(`[data-testid="focus-wheels"] [data-wheel="${first.id}"]`)).toHaveAttribute(
		'data-state',
		'done',
		{ timeout: 1_000 }
	);
	await expect(bay.getByTestId('bay-current')).toHaveText(`#${job.number} · ${job.wheels[1].position}`);
});

test('wrong PINs are slowed per person, and the right PIN waits too while the lock lasts', async ({ browser }) => {
	const store = await storeWithJobInBay('bay-pin');
	const page = await screen(browser, store, 'tech');
	const origin = new URL(page.url()).origin;
	const claim = (pin: string) =>
		page.request.post('/api/bays/T1/claim', { data: { userId: store.people.tech.id, pin }, headers: { origin } });
	const statuses = [];
	for (let i = 0; i < 7; i++) statuses.push((await claim('0000')).status());
	// Five free failures (403 each), then the sixth is counted and locks: the seventh is told to wait.
	expect(statuses.slice(0, 6)).toEqual([403, 403, 403, 403, 403, 403]);
	expect(statuses[6]).toBe(429);
	const locked = await claim(PIN);
	expect(locked.status()).toBe(429);
	expect(Number(locked.headers()['retry-after'])).toBeGreaterThan(0);
	expect((await locked.json()).message).toMatch(/Too many wrong PINs/);
	const claims = await withClient((c) =>
		c.query('SELECT count(*)::int AS n FROM bay_claims WHERE bay_id = $1', [store.bays[0].id])
	);
	expect(claims.rows[0].n).toBe(0);
});

test('the record refuses impossible values with clear messages and keeps every part of a partial save', async ({
	browser
}) => {
	const store = await storeWithJobInBay('bay-record');
	const lead = await screen(browser, store, 'lead');
	const job = await jobInBay(lead, store);
	const url = `/api/wheels/${job.wheels[0].id}/record`;
	const headers = { origin: new URL(lead.url()).origin };
	const put = (data: unknown) => lead.request.put(url, { data, headers });

	const refusals: [unknown, RegExp][] = [
		[{ version: 0, treadDepthMm: -1 }, /cannot be negative/i],
		[{ version: 0, dotCode: '6019' }, /week 60/i],
		[{ version: 0, weights: [{ plane: 'inner', type: 'clip', grams: 250, angleDeg: 0 }] }, /over 200 g/],
		[{ version: 0, pressureSetKpa: 'lots' }, /number/i],
		[{ version: 0, colour: 'red' }, /colour|unknown|not/i]
	];
	for (const [body, message] of refusals) {
		const r = await put(body);
		expect(r.status(), JSON.stringify(body)).toBe(400);
		const problem = await r.json();
		expect(problem.message, JSON.stringify(body)).toMatch(message);
		expect(problem.issues.length).toBeGreaterThan(0);
	}
	expect(
		(await withClient((c) => c.query('SELECT count(*)::int AS n FROM wheel_records'))).rows[0].n
	).toBeGreaterThanOrEqual(0);
	const none = await withClient((c) => c.query('SELECT 1 FROM wheel_records WHERE wheel_id = $1', [job.wheels[0].id]));
	expect(none.rowCount).toBe(0);

	// Three saves, each of one part, each on the version the last one returned.
	let version = 0;
	for (const part of [{ treadDepthMm: 6.2 }, { dotCode: '0124' }, { torqueAppliedNm: 108 }]) {
		const r = await put({ version, ...part });
		expect(r.status(), JSON.stringify(part)).toBe(200);
		version = (await r.json()).version;
	}
	const whole = await (await lead.request.get(url)).json();
	expect(whole).toMatchObject({ version: 3, treadDepthMm: 6.2, dotCode: '0124', torqueAppliedNm: 108 });

	// A save from a screen that saw version 1 is refused, and nothing changes.
	const stale = await put({ version: 1, treadDepthMm: 3 });
	expect(stale.status()).toBe(409);
	expect((await (await lead.request.get(url)).json()).treadDepthMm).toBe(6.2);
});

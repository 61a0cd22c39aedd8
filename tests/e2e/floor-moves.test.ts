// The lead's moves beyond whole jobs: one wheel by keyboard, reordering within a bay, a bay's queue back to
// waiting, drag and drop, and the same moves by touch on a tablet. Each test runs in a store of its own so the
// demo floor stays as the other tests expect it; positions are read back from the database.
import { expect, test, type Browser, type Page } from '@playwright/test';
import { createTestStore, newJob, type TestStore } from '../support/store';
import { submitSignIn } from '../support/console';
import { withClient } from '../support/database';

type Person = keyof TestStore['people'];

async function screen(browser: Browser, store: TestStore, who: Person, options = {}): Promise<Page> {
	const page = await (await browser.newContext(options)).newPage();
	const { email, password } = store.people[who];
	await submitSignIn(page, email, password);
	await expect(page.getByTestId('connection')).toHaveAttribute('data-state', 'live');
	return page;
}

interface Made {
	id: number;
	number: number;
	wheels: { id: number; version: number }[];
}

async function makeJobs(page: Page, count: number, hoursAhead = 1): Promise<Made[]> {
	const made: Made[] = [];
	for (let i = 0; i < count; i++) {
		const promisedAt = new Date(Date.now() + (hoursAhead * 60 + i) * 60_000).toISOString();
		const r = await page.request.post('/api/jobs', {
			data: newJob({ customer: { name: `Invented Customer ${i + 1}` }, promisedAt }),
			headers: { origin: new URL(page.url()).origin }
		});
		expect(r.status(), await r.text()).toBe(201);
		made.push(await r.json());
	}
	return made;
}

/** Where a job's wheels are: bay code (or null) and queue place, by wheel id. */
async function placesOf(jobId: number) {
	const r = await withClient((c) =>
		c.query(
			`SELECT w.id, b.code, w.queue_position AS place FROM wheels w LEFT JOIN bays b ON b.id = w.bay_id
			  WHERE w.job_id = $1 ORDER BY w.id`,
			[jobId]
		)
	);
	return r.rows as { id: number; code: string | null; place: number | null }[];
}

async function laneOrder(bayId: number): Promise<number[]> {
	const r = await withClient((c) =>
		c.query(`SELECT job_id FROM wheels WHERE bay_id = $1 AND state <> 'done' ORDER BY queue_position`, [bayId])
	);
	return r.rows.map((row) => row.job_id);
}

test('by keyboard: one wheel to a bay, a job reordered ahead of it, the bay taken back to waiting', async ({
	browser
}) => {
	const store = await createTestStore(`moves-keys-${Date.now()}`, 8);
	const lead = await screen(browser, store, 'lead');
	const writer = await screen(browser, store, 'writer');
	const [first, second] = await makeJobs(lead, 2);
	const t2 = store.bays[1];
	await expect(lead.locator(`[aria-label="Waiting line"] li[data-job="${second.number}"]`)).toBeVisible();

	// ↓ selects the first job, → its first wheel (LF), 2 sends that wheel alone to bay T2.
	await lead.keyboard.press('ArrowDown');
	await lead.keyboard.press('ArrowRight');
	await expect(lead.locator(`[data-wheel="${first.wheels[0].id}"][data-selected="true"]`).first()).toBeVisible();
	await lead.keyboard.press('2');
	await expect(lead.locator('[data-bay="T2"]')).toContainText(`#${first.number}`);
	await expect(writer.locator('[data-bay="T2"]')).toContainText(`#${first.number}`, { timeout: 1_000 });
	const places = await placesOf(first.id);
	expect(places.filter((p) => p.code === 'T2').map((p) => p.id)).toEqual([first.wheels[0].id]);
	expect(places.filter((p) => p.code === null)).toHaveLength(3);

	// ↓ goes on to the second job; 2 sends its four wheels behind; Shift+↑ moves them ahead as a block.
	await lead.keyboard.press('ArrowDown');
	await expect(lead.getByTestId('focus-job')).toHaveText(`Job #${second.number}`);
	await lead.keyboard.press('2');
	await expect.poll(() => laneOrder(t2.id)).toEqual([first.id, second.id, second.id, second.id, second.id]);
	await lead.keyboard.press('Shift+ArrowUp');
	await expect.poll(() => laneOrder(t2.id)).toEqual([second.id, second.id, second.id, second.id, first.id]);
	await expect(writer.locator('[data-bay="T2"] li').first()).toContainText(`#${second.number}`, { timeout: 1_000 });

	// Shift+2 selects bay T2's queue; W takes all of it back to the waiting line.
	await lead.keyboard.press('Shift+Digit2');
	await expect(lead.getByTestId('focus-bay')).toHaveText('Bay T2');
	await lead.keyboard.press('w');
	await expect.poll(() => laneOrder(t2.id)).toEqual([]);
	await expect(writer.locator('[data-bay="T2"]')).toContainText('empty', { timeout: 1_000 });
});

test('drag and drop: a waiting job onto a bay, one of its wheels back to waiting', async ({ browser }) => {
	const store = await createTestStore(`moves-drag-${Date.now()}`, 8);
	const lead = await screen(browser, store, 'lead');
	const writer = await screen(browser, store, 'writer');
	const [job] = await makeJobs(lead, 1);
	const row = lead.locator(`[aria-label="Waiting line"] li[data-job="${job.number}"]`);

	await row.dragTo(lead.locator('[data-bay="T4"]'));
	await expect.poll(async () => (await placesOf(job.id)).map((p) => p.code)).toEqual(['T4', 'T4', 'T4', 'T4']);
	await expect(writer.locator('[data-bay="T4"]')).toContainText(`#${job.number}`, { timeout: 1_000 });

	const wheel = job.wheels[2].id;
	await lead.locator(`[data-bay="T4"] li:has([data-wheel="${wheel}"])`).dragTo(lead.getByLabel('Waiting line'));
	await expect.poll(async () => (await placesOf(job.id)).map((p) => p.code)).toEqual(['T4', 'T4', null, 'T4']);
	await expect(writer.locator(`[aria-label="Waiting line"] li[data-job="${job.number}"]`)).toBeVisible({
		timeout: 1_000
	});
});

test('a writer cannot drag wheels: nothing is draggable and the move keys are not offered', async ({ browser }) => {
	const store = await createTestStore(`moves-writer-${Date.now()}`, 2);
	const writer = await screen(browser, store, 'writer');
	const [job] = await makeJobs(writer, 1);
	const row = writer.locator(`[aria-label="Waiting line"] li[data-job="${job.number}"]`);
	await expect(row).toHaveAttribute('draggable', 'false');
	await writer.keyboard.press('ArrowDown');
	await writer.keyboard.press('1');
	await expect(writer.locator('[data-send]')).toHaveCount(0);
	expect((await placesOf(job.id)).every((p) => p.code === null)).toBe(true);
});

test('on a tablet: tap a job, tap a bay button; the page does not scroll sideways', async ({ browser }) => {
	const store = await createTestStore(`moves-tablet-${Date.now()}`, 8);
	const tablet = await screen(browser, store, 'lead', { viewport: { width: 1024, height: 768 }, hasTouch: true });
	const [job] = await makeJobs(tablet, 1);
	await tablet.locator(`[aria-label="Waiting line"] li[data-job="${job.number}"] button`).tap();
	await expect(tablet.getByTestId('focus-job')).toHaveText(`Job #${job.number}`);
	await tablet.locator('[data-send="T3"]').tap();
	await expect.poll(async () => (await placesOf(job.id)).map((p) => p.code)).toEqual(['T3', 'T3', 'T3', 'T3']);
	const sideways = await tablet.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
	expect(sideways).toBeLessThanOrEqual(0);
});

test('fits a 1920×1080 screen without scrolling with 8 bays and 40 waiting jobs', async ({ browser }) => {
	const store = await createTestStore(`moves-fit-${Date.now()}`, 8);
	const lead = await screen(browser, store, 'lead', { viewport: { width: 1920, height: 1080 } });
	const jobs = await makeJobs(lead, 48);
	// Eight jobs go to the bays (four wheels each), forty stay waiting.
	await withClient(async (c) => {
		for (const [i, j] of jobs.slice(40).entries()) {
			await c.query(`SELECT lugline_move_wheels($1, NULL, $2::int[], $3::int[], $4, NULL)`, [
				store.id,
				j.wheels.map((w) => w.id),
				j.wheels.map((w) => w.version),
				store.bays[i].id
			]);
		}
	});
	await lead.reload();
	await expect(lead.getByTestId('connection')).toHaveAttribute('data-state', 'live');
	await expect(lead.locator('[aria-label="Waiting line"] li')).toHaveCount(40);
	for (const b of store.bays) await expect(lead.locator(`[data-bay="${b.code}"] li`)).toHaveCount(4);

	const overflow = () =>
		lead.evaluate(() => {
			const over = (el: Element) => el.scrollHeight - el.clientHeight;
			return {
				page: document.documentElement.scrollHeight - window.innerHeight,
				sideways: document.documentElement.scrollWidth - window.innerWidth,
				waiting: over(document.querySelector('[aria-label="Waiting line"] ul')!),
				bays: [...document.querySelectorAll('[data-bay] ol')].map(over),
				statusLine: over(document.querySelector('[data-testid="status-line"]')!)
			};
		});
	const none = { page: 0, sideways: 0, waiting: 0, bays: Array(8).fill(0), statusLine: 0 };
	if (process.env.LUGLINE_SCREENSHOT) await lead.screenshot({ path: process.env.LUGLINE_SCREENSHOT });
	expect(await overflow()).toEqual(none);
	// With a wheel in a bay selected, the status line lists the keys that act on it and still fits.
	await lead.locator(`[data-bay="T1"] li button`).first().click();
	await expect(lead.getByTestId('status-line')).toContainText('later');
	expect(await overflow()).toEqual(none);
	// Every waiting row is on screen, the last one included.
	await expect(lead.locator('[aria-label="Waiting line"] li').last()).toBeInViewport();
});

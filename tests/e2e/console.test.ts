// The console by keyboard: a lead sends a waiting job's wheels to a bay with two keys, and another signed-in screen
// sees it within a second; a move made on top of a stale screen is refused with the conflict in words and the
// screen ends showing the real floor; the help overlay lists every command of the role.
import { expect, test } from '@playwright/test';
import { commandsFor } from '../../src/lib/console/commands';
import { consoleScreen } from '../support/console';
import { withClient } from '../support/database';

test('a lead sends the first waiting job to bay 3 by keyboard; a second screen sees it within a second', async ({
	browser
}) => {
	const lead = await consoleScreen(browser, 'lead');
	const writer = await consoleScreen(browser, 'writer');
	const first = lead.locator('[aria-label="Waiting line"] li').first();
	const number = await first.getAttribute('data-job');
	expect(number).toBeTruthy();

	// The writer has the same job open in the focus pane, which names each wheel's bay.
	await writer.locator(`[aria-label="Waiting line"] li[data-job="${number}"] button`).click();
	await expect(writer.getByTestId('focus-job')).toHaveText(`Job #${number}`);

	await lead.keyboard.press('ArrowDown');
	await expect(lead.getByTestId('focus-job')).toHaveText(`Job #${number}`);
	await lead.keyboard.press('3');

	await expect(lead.getByTestId('focus-wheels')).toContainText('B3');
	await expect(writer.getByTestId('focus-wheels')).toContainText('B3', { timeout: 1_000 });
	await expect(writer.getByTestId('focus-wheels')).not.toContainText('waiting');
	await expect(writer.locator(`[aria-label="Waiting line"] li[data-job="${number}"]`)).toHaveCount(0);
	const rows = await withClient((c) =>
		c.query(
			`SELECT b.code FROM wheels w JOIN jobs j ON j.id = w.job_id JOIN stores s ON s.id = j.store_id
			   LEFT JOIN bays b ON b.id = w.bay_id WHERE s.slug = 'demo' AND j.number = $1 AND w.state = 'queued'`,
			[Number(number)]
		)
	);
	expect(rows.rows.length).toBeGreaterThan(0);
	expect(rows.rows.every((r) => r.code === 'B3')).toBe(true);
});

test('a move from a stale screen is refused in words and the screen shows the real floor', async ({ browser }) => {
	const lead = await consoleScreen(browser, 'lead');
	const first = lead.locator('[aria-label="Waiting line"] li').first();
	const number = Number(await first.getAttribute('data-job'));
	await lead.keyboard.press('ArrowDown');
	await expect(lead.getByTestId('focus-job')).toHaveText(`Job #${number}`);

	// Another lead moves the same job's wheels while this screen is cut off from the stream.
	await lead.context().setOffline(true);
	await withClient(async (c) => {
		const wheels = await c.query(
			`SELECT w.id FROM wheels w JOIN jobs j ON j.id = w.job_id JOIN stores s ON s.id = j.store_id
			  WHERE s.slug = 'demo' AND j.number = $1 AND w.state = 'queued' AND w.bay_id IS NULL`,
			[number]
		);
		const bay = await c.query(
			`SELECT b.id FROM bays b JOIN stores s ON s.id = b.store_id WHERE s.slug = 'demo' AND b.code = 'B5'`
		);
		await c.query(
			'SELECT lugline_move_wheels((SELECT id FROM stores WHERE slug = $1), NULL, $2::int[], (SELECT array_agg(version ORDER BY ord) FROM unnest($2::int[]) WITH ORDINALITY AS u(id, ord) JOIN wheels w ON w.id = u.id), $3, NULL)',
			['demo', wheels.rows.map((r) => r.id), bay.rows[0].id]
		);
	});
	// Back online, but the stream stays cut until the move has been tried: otherwise a quick reconnect could bring
	// the other lead's move first, and the screen would no longer be stale (a race the test lost now and then).
	await lead.route('**/api/events', (route) => route.abort());
	await lead.context().setOffline(false);
	await lead.keyboard.press('2');

	await expect(lead.getByRole('alert')).toContainText('Someone else changed this');
	await lead.unroute('**/api/events');
	// Once the stream is back, the screen shows where the wheels really are.
	// (The focus pane names each wheel's bay; a long lane may draw only its first wheels.)
	const wheels = lead.getByTestId('focus-wheels');
	await expect(wheels).toContainText('B5', { timeout: 15_000 });
	await expect(wheels).not.toContainText('B2');
	await expect(wheels).not.toContainText('waiting');
});

test('the help overlay lists every command the role has', async ({ browser }) => {
	const manager = await consoleScreen(browser, 'manager');
	await manager.keyboard.press('Shift+Slash');
	const rows = manager.getByTestId('help-commands').locator('tr');
	const ids = await rows.evaluateAll((trs) => trs.map((tr) => tr.getAttribute('data-command')));
	expect(ids).toEqual(commandsFor('manager').map((c) => c.id));
	await manager.keyboard.press('Shift+Slash');
	await expect(manager.getByTestId('help-commands')).toHaveCount(0);
});

// The database stops under a running app: /api/health and signed-in pages answer 503 quickly (not a hang, not a
// 500, and the session survives), then 200 again once the database is back, without restarting the app.
import { spawnSync } from 'node:child_process';
import { expect, test } from '@playwright/test';
import { account } from '../support/accounts';
import { submitSignIn } from '../support/console';

function cluster(command: 'start' | 'stop') {
	const result = spawnSync(process.execPath, ['scripts/db.mjs', command, '--test'], { encoding: 'utf8' });
	if (result.status !== 0) throw new Error(`db ${command} failed: ${result.stdout}${result.stderr}`);
}

test('health answers 503 quickly while the database is stopped and 200 after it restarts', async ({
	page,
	request
}) => {
	test.setTimeout(90_000);
	const manager = account('manager');
	await submitSignIn(page, manager.email, manager.password);
	await expect(page.getByTestId('role')).toHaveText('Manager');

	expect((await request.get('/api/health')).status()).toBe(200);
	cluster('stop');
	try {
		for (let i = 0; i < 3; i++) {
			const started = Date.now();
			const response = await request.get('/api/health', { timeout: 10_000 });
			const elapsed = Date.now() - started;
			expect(response.status()).toBe(503);
			expect((await response.json()).database.state).toBe('down');
			expect(elapsed, 'answered within 5 s').toBeLessThan(5000);
		}
		const started = Date.now();
		const shell = await page.request.get('/', { maxRedirects: 0 });
		expect(shell.status(), 'a signed-in page during the outage').toBe(503);
		expect(Date.now() - started).toBeLessThan(5000);
	} finally {
		cluster('start');
	}

	const back = Date.now();
	await expect
		.poll(async () => (await request.get('/api/health')).status(), { timeout: 10_000, intervals: [250] })
		.toBe(200);
	expect(Date.now() - back).toBeLessThan(10_000);
	// The same session works again: the outage did not sign anyone out.
	await page.reload();
	await expect(page.getByTestId('role')).toHaveText('Manager');
});

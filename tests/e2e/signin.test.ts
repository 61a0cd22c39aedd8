// Sign-in end to end in Chromium: every role reaches the shell, a wrong password is refused without saying whether
// the account exists, repeated failures are slowed, and a disabled user is refused on their next request.
import { expect, test } from '@playwright/test';
import { hash } from '@node-rs/argon2';
import { roleLabels, roles } from '../../src/lib/roles';
import { account } from '../support/accounts';
import { submitSignIn } from '../support/console';
import { withClient } from '../support/database';

test('a signed-out visitor is sent to the sign-in page', async ({ page }) => {
	await page.goto('/');
	await expect(page).toHaveURL(/\/signin\?redirectTo=%2F$/);
	await expect(page.getByRole('button', { name: 'Sign in' })).toBeVisible();
});

for (const role of roles) {
	test(`the ${role} signs in to the shell, which shows the role, and signs out`, async ({ page }) => {
		const demo = account(role);
		await submitSignIn(page, demo.email, demo.password);
		await expect(page).toHaveURL('/');
		await expect(page.getByTestId('role')).toHaveText(roleLabels[role]);
		await expect(page.getByTestId('signed-in-as')).toContainText(demo.name);
		await expect(page.getByTestId('store-name')).toContainText('(demo)');
		await page.getByRole('button', { name: 'Sign out' }).click();
		await expect(page).toHaveURL(/\/signin/);
		await page.goto('/');
		await expect(page).toHaveURL(/\/signin/);
	});
}

test('a wrong password and an unknown account get the same answer', async ({ page }) => {
	const writer = account('writer');
	await submitSignIn(page, writer.email, 'not-the-password');
	const alert = page.getByRole('alert');
	await expect(alert).toContainText('do not match an active account');
	const wrongPassword = await alert.textContent();
	await submitSignIn(page, 'nobody-here@demo.lugline.test', 'whatever-1');
	await expect(page.getByRole('alert')).toHaveText(wrongPassword ?? '');
	await expect(page).toHaveURL(/\/signin/);
	await page.goto('/');
	await expect(page).toHaveURL(/\/signin/);
});

test('repeated failures for one account are slowed, and the counter lives in the database', async ({ page }) => {
	const email = `slowed-${Date.now()}@demo.lugline.test`;
	for (let i = 0; i < 6; i++) await submitSignIn(page, email, `wrong-${i}`);
	await submitSignIn(page, email, 'wrong-again');
	await expect(page.getByRole('alert')).toContainText('Too many failed sign-ins');
	const row = await withClient((c) =>
		c.query('SELECT failures, locked_until > now() AS locked FROM signin_failures WHERE account_key = $1', [email])
	);
	expect(row.rows[0]).toMatchObject({ failures: 6, locked: true });
	await withClient((c) => c.query('DELETE FROM signin_failures WHERE account_key = $1', [email]));
});

test('a disabled user is refused on the next request', async ({ page }) => {
	const email = `disable-me-${Date.now()}@demo.lugline.test`;
	const password = 'temporary-writer-1';
	const id = await withClient(async (c) => {
		const store = await c.query("SELECT id FROM stores WHERE slug = 'demo'");
		const inserted = await c.query(
			`INSERT INTO users (store_id, name, email, role, password_hash) VALUES ($1, 'Temporary Writer (test)', $2, 'writer', $3) RETURNING id`,
			[store.rows[0].id, email, await hash(password)]
		);
		return inserted.rows[0].id as number;
	});
	try {
		await submitSignIn(page, email, password);
		await expect(page.getByTestId('role')).toHaveText(roleLabels.writer);
		await withClient((c) =>
			c.query('UPDATE users SET active = false, session_version = session_version + 1 WHERE id = $1', [id])
		);
		await page.reload();
		await expect(page).toHaveURL(/\/signin/);
		const me = await page.request.get('/api/me');
		expect(me.status()).toBe(401);
		// Signing in again fails like a wrong password: nothing says the account exists but is disabled.
		await submitSignIn(page, email, password);
		await expect(page.getByRole('alert')).toContainText('do not match an active account');
	} finally {
		await withClient((c) => c.query('DELETE FROM users WHERE id = $1', [id]));
	}
});

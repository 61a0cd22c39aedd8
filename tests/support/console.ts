// Signing in through the real form and waiting for the console to go live, shared by the browser tests.
import { expect, type Browser, type Page } from '@playwright/test';
import type { Role } from '../../src/lib/roles';
import { account } from './accounts';

/** Fills and submits the sign-in form; asserts nothing about the outcome. */
export async function submitSignIn(page: Page, email: string, password: string): Promise<void> {
	await page.goto('/signin');
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
}

/** Signs a demo account in on this page and waits until the console's stream is live. */
export async function openConsole(page: Page, role: Role): Promise<Page> {
	const { email, password } = account(role);
	await submitSignIn(page, email, password);
	await expect(page.getByTestId('connection')).toHaveAttribute('data-state', 'live');
	return page;
}

/** A new browser context (a second screen) with a demo account signed in to a live console. */
export async function consoleScreen(browser: Browser, role: Role): Promise<Page> {
	return openConsole(await (await browser.newContext()).newPage(), role);
}

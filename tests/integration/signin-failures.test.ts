// The sign-in slowing counter against the real database: free failures, then a lock that doubles, reset by success.
import { afterEach, describe, expect, it } from 'vitest';
import * as failures from '$lib/server/db/signin-failures';
import { db } from '$lib/server/db';

const key = `counter-${process.pid}@demo.lugline.test`;

afterEach(async () => {
	await failures.clear(key);
});

describe('sign-in failure counter', () => {
	it('allows the free failures, then locks for 1 s, then 2 s', async () => {
		for (let i = 0; i < failures.FREE_FAILURES; i++) {
			await failures.recordFailure(key);
			expect(await failures.lockedFor(key), `after failure ${i + 1}`).toBe(0);
		}
		await failures.recordFailure(key);
		expect(await failures.lockedFor(key)).toBe(1);
		await failures.recordFailure(key);
		expect(await failures.lockedFor(key)).toBe(2);
	});

	it('counts failures from two connections at once without losing one', async () => {
		await Promise.all(Array.from({ length: 8 }, () => failures.recordFailure(key)));
		const row = await db()('signin_failures').where({ account_key: key }).first();
		expect(row.failures).toBe(8);
	});

	it('forgets old failures once the window has passed', async () => {
		for (let i = 0; i < 7; i++) await failures.recordFailure(key);
		await db()('signin_failures')
			.where({ account_key: key })
			.update({ first_failed_at: db().raw(`now() - interval '${failures.WINDOW_MINUTES + 1} minutes'`) });
		await failures.recordFailure(key);
		const row = await db()('signin_failures').where({ account_key: key }).first();
		expect(row.failures).toBe(1);
		expect(await failures.lockedFor(key)).toBe(0);
	});

	it('keys by the e-mail as typed, case-insensitively', () => {
		expect(failures.accountKey('  Writer@Demo.Lugline.TEST ')).toBe('writer@demo.lugline.test');
	});
});

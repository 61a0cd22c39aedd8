// Sign-in brute force against two instances sharing one database. Attempts are booked per typed e-mail and per
// client address before the password is checked (src/lib/server/db/signin-failures.ts), so parallel attempts and a
// second instance do not multiply the budget. X-Forwarded-For is only believed by an instance configured to sit
// behind a proxy (adapter-node's ADDRESS_HEADER and XFF_DEPTH).
import { parse as devalue } from 'devalue';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
	ADDRESS_FREE_FAILURES,
	FREE_FAILURES,
	MAX_LOCK_SECONDS,
	WINDOW_MINUTES
} from '../../src/lib/server/db/signin-failures';
import { withClient } from '../support/database';
import { logEntries, startInstances, stopInstances, type Instance } from '../support/instances';
import { createTestStore, type TestStore } from '../support/store';

let direct: Instance; // no proxy configured: X-Forwarded-For is ignored
let proxied: Instance; // behind a proxy: the right-most X-Forwarded-For address is the client's
let store: TestStore;
let sent = 0;

beforeAll(async () => {
	store = await createTestStore(`brute-${process.pid}`);
	[direct] = await startInstances([3651]);
	[proxied] = await startInstances([3652], { ADDRESS_HEADER: 'x-forwarded-for', XFF_DEPTH: '1' });
}, 60_000);

afterAll(async () => {
	await stopInstances([direct, proxied].filter(Boolean));
	// The address counters of this file (loopback included) must not slow the files after it.
	await withClient((c) =>
		c.query(`DELETE FROM signin_failures WHERE account_key LIKE 'addr:%' OR account_key LIKE $1`, [
			`%@brute-${process.pid}%`
		])
	);
});

interface Answer {
	status: number;
	retryAfter: string | null;
	data: Record<string, unknown> | null;
}

/** One sign-in through the form action as `enhance` sends it; the answer's real status is inside the JSON. */
async function attempt(instance: Instance, email: string, password: string, forwardedFor?: string): Promise<Answer> {
	sent++;
	const r = await fetch(`${instance.url}/signin`, {
		method: 'POST',
		headers: {
			origin: instance.url,
			'content-type': 'application/x-www-form-urlencoded',
			accept: 'application/json',
			'x-sveltekit-action': 'true',
			...(forwardedFor ? { 'x-forwarded-for': forwardedFor } : {})
		},
		body: new URLSearchParams({ email, password }),
		redirect: 'manual'
	});
	const body = (await r.json()) as { type: string; status?: number; data?: string };
	if (body.type === 'redirect') return { status: 303, retryAfter: null, data: null };
	return { status: body.status ?? r.status, retryAfter: r.headers.get('retry-after'), data: devalue(body.data!) };
}

/** The most failures one account can take in `seconds` if an attacker tries each time the lock allows. */
function mostFailures(seconds: number): number {
	let t = 0;
	let count = 0;
	let first = 0;
	let lockedUntil = 0;
	let total = 0;
	for (;;) {
		t = Math.max(t, lockedUntil);
		if (t >= seconds) return total;
		if (count === 0 || first < t - WINDOW_MINUTES * 60) {
			count = 1;
			first = t;
			lockedUntil = 0;
		} else {
			count++;
			if (count > FREE_FAILURES) lockedUntil = t + Math.min(MAX_LOCK_SECONDS, 2 ** (count - FREE_FAILURES - 1));
		}
		total++;
	}
}

describe('sign-in under brute force', () => {
	it('allows fewer than 100 failures per account per hour, whatever the number of instances', () => {
		// The schedule itself (5 free failures per 15 minutes, then locks of 1 s, 2 s, 4 s … up to 15 minutes).
		const perHour = mostFailures(3600);
		console.log(`sign-in: at most ${perHour} failures per account per hour, ${mostFailures(60)} in the first minute`);
		expect(perHour).toBeLessThan(100);
	});

	it('100 wrong passwords in a minute from one address, over both instances, in parallel: slowed with Retry-After', async () => {
		const { email } = store.people.writer;
		const answers: Answer[] = [];
		const started = Date.now();
		for (let batch = 0; batch < 10; batch++) {
			answers.push(
				...(await Promise.all(
					Array.from({ length: 10 }, (_, i) =>
						i % 2 === 0
							? attempt(direct, email, `wrong-${batch}-${i}`)
							: attempt(proxied, email, `wrong-${batch}-${i}`, '203.0.113.7')
					)
				))
			);
		}
		const seconds = (Date.now() - started) / 1000;
		const wrong = answers.filter((a) => a.status === 400).length;
		const slowed = answers.filter((a) => a.status === 429);
		console.log(
			`sign-in: 100 wrong passwords in ${seconds.toFixed(1)} s → ${wrong} checked and refused, ${slowed.length} slowed (429)`
		);
		expect(seconds).toBeLessThan(60);
		expect(wrong + slowed.length).toBe(100);
		expect(wrong).toBeLessThanOrEqual(mostFailures(60));
		for (const a of slowed) expect(Number(a.retryAfter)).toBeGreaterThanOrEqual(1);
		const row = await withClient(
			async (c) => (await c.query('SELECT failures FROM signin_failures WHERE account_key = $1', [email])).rows[0]
		);
		expect(row.failures).toBe(wrong);
	});

	it('the same from many addresses behind the proxy: the account is still slowed', async () => {
		const { email } = store.people.lead;
		const answers: Answer[] = [];
		for (let batch = 0; batch < 10; batch++) {
			answers.push(
				...(await Promise.all(
					Array.from({ length: 10 }, (_, i) =>
						attempt(proxied, email, `wrong-${batch}-${i}`, `198.51.100.${batch * 10 + i + 1}`)
					)
				))
			);
		}
		const wrong = answers.filter((a) => a.status === 400).length;
		expect(wrong + answers.filter((a) => a.status === 429).length).toBe(100);
		expect(wrong).toBeLessThanOrEqual(mostFailures(60));
		// Behind the proxy the addresses are believed (each its own counter) …
		const addresses = await withClient(
			async (c) =>
				(await c.query(`SELECT count(*)::int AS n FROM signin_failures WHERE account_key LIKE 'addr:198.51.100.%'`))
					.rows[0].n
		);
		expect(addresses).toBeGreaterThan(1);
	});

	it('without a proxy configured, X-Forwarded-For is ignored: rotating it does not escape the address limit', async () => {
		await withClient((c) => c.query(`DELETE FROM signin_failures WHERE account_key = 'addr:127.0.0.1'`));
		const answers: Answer[] = [];
		// Unknown accounts, one each, so only the address counter can slow them.
		for (let i = 0; i < ADDRESS_FREE_FAILURES + 10; i++) {
			answers.push(await attempt(direct, `nobody-${i}@brute-${process.pid}.lugline.test`, 'guess', `192.0.2.${i + 1}`));
		}
		expect(answers.slice(0, ADDRESS_FREE_FAILURES).every((a) => a.status === 400)).toBe(true);
		expect(answers.slice(ADDRESS_FREE_FAILURES + 1).every((a) => a.status === 429)).toBe(true);
		const spoofed = await withClient(
			async (c) =>
				(await c.query(`SELECT count(*)::int AS n FROM signin_failures WHERE account_key LIKE 'addr:192.0.2.%'`))
					.rows[0].n
		);
		expect(spoofed).toBe(0);
		const logged = logEntries(direct).filter(
			(e) => e.msg === 'sign-in attempt' && String(e.email).startsWith('nobody-')
		);
		expect(logged.length).toBe(ADDRESS_FREE_FAILURES + 10);
		expect(new Set(logged.map((e) => e.address))).toEqual(new Set(['127.0.0.1']));
		await withClient((c) => c.query(`DELETE FROM signin_failures WHERE account_key = 'addr:127.0.0.1'`));
	});

	it('an unknown account and a wrong password get the same answer', async () => {
		const unknown = await attempt(
			proxied,
			`no-such-person@brute-${process.pid}.lugline.test`,
			'whatever-1',
			'203.0.113.50'
		);
		const wrong = await attempt(proxied, store.people.tech.email, 'whatever-1', '203.0.113.51');
		expect(unknown.status).toBe(400);
		expect(wrong.status).toBe(unknown.status);
		const { email: _a, ...u } = unknown.data!;
		const { email: _b, ...w } = wrong.data!;
		expect(w).toEqual(u);
	});

	it('the real user signs in once the window has passed; every attempt was logged', async () => {
		const { email, password } = store.people.writer;
		// While the account is locked (the attack goes on), even the right password waits.
		let locked = false;
		for (let i = 0; i < 20 && !locked; i++) locked = (await attempt(direct, email, `wrong-again-${i}`)).status === 429;
		expect(locked).toBe(true);
		const during = await attempt(direct, email, password);
		expect(during.status).toBe(429);
		// As if the window had passed: move the account's counter back in time.
		await withClient((c) =>
			c.query(
				`UPDATE signin_failures SET first_failed_at = first_failed_at - make_interval(mins => $2 + 1),
				   locked_until = now() - interval '1 second' WHERE account_key = $1`,
				[email, WINDOW_MINUTES]
			)
		);
		const after = await attempt(direct, email, password);
		expect(after.status).toBe(303);
		const counter = await withClient(
			async (c) =>
				(await c.query('SELECT count(*)::int AS n FROM signin_failures WHERE account_key = $1', [email])).rows[0].n
		);
		expect(counter).toBe(0);

		const attempts = [...logEntries(direct), ...logEntries(proxied)].filter((e) => e.msg === 'sign-in attempt');
		expect(attempts.length).toBe(sent);
		for (const e of attempts) {
			expect(e.time).toMatch(/Z$/);
			expect(['signed_in', 'credentials', 'slowed', 'invalid']).toContain(e.outcome);
			expect(e).not.toHaveProperty('password');
		}
	});
});

// Authentication with Auth.js: a Credentials provider and a JWT session carrying user id, store id, role and
// session version. The `jwt` callback re-reads the user on every request, so disabling an account or changing a
// role takes effect on that user's next request.
import { SvelteKitAuth, CredentialsSignin } from '@auth/sveltekit';
import Credentials from '@auth/sveltekit/providers/credentials';
import { Auth, raw, skipCSRFCheck, setEnvDefaults, type AuthConfig } from '@auth/core';
import { decode, getToken, type JWT } from '@auth/core/jwt';
import type { RequestEvent } from '@sveltejs/kit';
import { env } from '$env/dynamic/private';
import { config } from './config';
import { isDatabaseUnavailable } from './db';
import * as users from './db/users';
import * as signinFailures from './db/signin-failures';
import { verifyDecoy, verifySecret } from './passwords';
import { errorDetails, log } from './log';
import { signInSchema } from '$lib/schemas/signin';
import type { Role } from '$lib/roles';

/** The part of the session the app uses. `unverified` means the database could not be asked this time. */
export interface StaffSession {
	userId: number;
	storeId: number;
	role: Role;
	name: string;
	email: string;
	sessionVersion: number;
	unverified?: boolean;
}

class WrongCredentials extends CredentialsSignin {
	code = 'credentials';
}
class DatabaseDown extends CredentialsSignin {
	code = 'unavailable';
}

/**
 * Checks the password only. Slowing and counting happen around it in `signInWithPassword`, the one way in (the
 * hooks close Auth.js's own HTTP endpoints).
 */
async function authorize(credentials: Partial<Record<string, unknown>>) {
	const parsed = signInSchema.safeParse(credentials);
	if (!parsed.success) throw new WrongCredentials();
	const { email, password } = parsed.data;
	try {
		const user = await users.findForSignIn(email);
		const ok = user ? await verifySecret(user.passwordHash, password) : await verifyDecoy(password);
		// A disabled account fails exactly like a wrong password: nothing tells whether it exists.
		if (!user || !ok || !user.active) throw new WrongCredentials();
		return {
			id: String(user.id),
			name: user.name,
			email: user.email,
			storeId: user.storeId,
			role: user.role,
			sessionVersion: user.sessionVersion
		};
	} catch (error) {
		if (error instanceof CredentialsSignin) throw error;
		if (isDatabaseUnavailable(error)) throw new DatabaseDown();
		throw error;
	}
}

let cachedConfig: AuthConfig | undefined;

/** Built on first use, not at import: `vite build` imports this module without any secrets set. */
export function authConfig(): AuthConfig {
	return (cachedConfig ??= {
		providers: [Credentials({ credentials: { email: {}, password: {} }, authorize })],
		session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
		pages: { signIn: '/signin', error: '/signin' },
		// The built app ignores AUTH_TRUST_HOST; ORIGIN and SvelteKit's origin check guard the host instead.
		trustHost: true,
		logger: {
			error(error) {
				// A refused sign-in is expected traffic, logged once by signInWithPassword; never the password.
				if (!(error instanceof CredentialsSignin)) log.error({ err: errorDetails(error) }, 'auth: error');
			}
		},
		secret: config().AUTH_SECRET,
		callbacks: {
			async jwt({ token, user }) {
				if (user) {
					const u = user as unknown as { id: string; storeId: number; role: Role; sessionVersion: number };
					return { ...token, uid: Number(u.id), storeId: u.storeId, role: u.role, sv: u.sessionVersion };
				}
				return recheck(token);
			},
			session({ session, token }) {
				const staff = toStaff(token);
				return { ...session, staff };
			}
		}
	});
}

/**
 * The per-request check of a session's user, shared by Auth.js's `jwt` callback (pages) and the API fast path:
 * a disabled account, a bumped session version or a removed user ends the session; a changed role or store is
 * taken from the database, not the token.
 */
async function recheck(token: JWT): Promise<JWT | null> {
	try {
		const current = await users.readForSession(Number(token.uid));
		if (!current || !current.active || current.sessionVersion !== token.sv) return null;
		const { unverified: _, ...rest } = token;
		return { ...rest, storeId: current.storeId, role: current.role, name: current.name, email: current.email };
	} catch (error) {
		// Signing everyone out because the database restarted would be worse than a brief 503.
		if (isDatabaseUnavailable(error)) return { ...token, unverified: true };
		throw error;
	}
}

function toStaff(token: JWT): StaffSession {
	return {
		userId: Number(token.uid),
		storeId: Number(token.storeId),
		role: token.role as Role,
		name: String(token.name ?? ''),
		email: String(token.email ?? ''),
		sessionVersion: Number(token.sv),
		unverified: token.unverified === true
	};
}

// Decrypted session cookies of this instance, by cookie value. Decrypting is the costly part of a check; the user
// is still re-read from the database on every request.
const decoded = new Map<string, JWT>();
const DECODED_MAX = 10_000;

/**
 * The session of a JSON API request. Does what Auth.js's session check does (decrypt the cookie, check expiry,
 * re-read the user) without re-encrypting and re-sending the cookie on every call: screens make many API calls a
 * minute, and page loads keep the cookie's rolling expiry fresh.
 */
export async function apiSession(request: Request, secure: boolean): Promise<StaffSession | null> {
	const cookieName = `${secure ? '__Secure-' : ''}authjs.session-token`;
	const rawToken = (await getToken({ req: request, secret: config().AUTH_SECRET, secureCookie: secure, raw: true })) as
		string | null;
	if (!rawToken) return null;
	let token = decoded.get(rawToken);
	if (!token) {
		token =
			(await decode({ token: rawToken, secret: config().AUTH_SECRET, salt: cookieName }).catch(() => null)) ??
			undefined;
		if (!token) return null;
		if (decoded.size >= DECODED_MAX) decoded.delete(decoded.keys().next().value!);
		decoded.set(rawToken, token);
	}
	if (typeof token.exp === 'number' && token.exp * 1000 < Date.now()) {
		decoded.delete(rawToken);
		return null;
	}
	const checked = await recheck(token);
	return checked ? toStaff(checked) : null;
}

export const { handle: authHandle, signOut } = SvelteKitAuth(async () => authConfig());

export type SignInResult =
	{ ok: true } | { ok: false; code: 'credentials' | 'unavailable' } | { ok: false; code: 'slowed'; retryAfter: number };

/** The client's address as adapter-node reports it: the socket's, or a header only when ADDRESS_HEADER names one. */
export function clientAddress(event: RequestEvent): string {
	try {
		return event.getClientAddress();
	} catch {
		return 'unknown';
	}
}

/**
 * Signs in from our own form action, the only way in. Each attempt is booked against the typed e-mail and against
 * the client's address before the password is checked (src/lib/server/db/signin-failures.ts), so attempts in
 * parallel or across instances cannot outrun the slowing; every attempt is logged with its outcome. Auth.js's
 * ready-made action throws on a wrong password (a 500 in SvelteKit), so this calls Auth.js's core the same way and
 * turns its answer into a result the page can show.
 */
export async function signInWithPassword(event: RequestEvent, email: string, password: string): Promise<SignInResult> {
	const started = performance.now();
	const address = clientAddress(event);
	const account = signinFailures.accountKey(email);
	const result = await attempt(event, account, signinFailures.addressKey(address), email, password);
	log.info(
		{
			requestId: event.locals.requestId,
			email: account,
			address,
			outcome: result.ok ? 'signed_in' : result.code,
			retryAfter: !result.ok && result.code === 'slowed' ? result.retryAfter : undefined,
			ms: Math.round(performance.now() - started)
		},
		'sign-in attempt'
	);
	return result;
}

async function attempt(
	event: RequestEvent,
	account: string,
	address: string,
	email: string,
	password: string
): Promise<SignInResult> {
	try {
		const addressWait = await signinFailures.reserveAttempt(address, signinFailures.ADDRESS_FREE_FAILURES);
		if (addressWait > 0) return { ok: false, code: 'slowed', retryAfter: addressWait };
		const accountWait = await signinFailures.reserveAttempt(account);
		if (accountWait > 0) return { ok: false, code: 'slowed', retryAfter: accountWait };
		const result = await checkPassword(event, email, password);
		if (result.ok) {
			await signinFailures.clear(account);
			await signinFailures.release(address);
		}
		return result;
	} catch (error) {
		if (isDatabaseUnavailable(error)) return { ok: false, code: 'unavailable' };
		throw error;
	}
}

async function checkPassword(
	event: RequestEvent,
	email: string,
	password: string
): Promise<{ ok: true } | { ok: false; code: 'credentials' | 'unavailable' }> {
	const options: AuthConfig = { ...authConfig(), basePath: '/auth', skipCSRFCheck, raw };
	setEnvDefaults(env, options);
	const headers = new Headers(event.request.headers);
	headers.set('Content-Type', 'application/x-www-form-urlencoded');
	const request = new Request(new URL('/auth/callback/credentials', event.url.origin), {
		method: 'POST',
		headers,
		body: new URLSearchParams({ email, password, callbackUrl: '/' })
	});
	try {
		const response = (await Auth(request, options)) as unknown as {
			cookies?: { name: string; value: string; options: Record<string, unknown> }[];
			redirect?: string;
		};
		const failure = response.redirect ? new URL(response.redirect, event.url.origin).searchParams.get('code') : null;
		if (failure) return { ok: false, code: failure === 'unavailable' ? failure : 'credentials' };
		for (const c of response.cookies ?? []) event.cookies.set(c.name, c.value, { path: '/', ...c.options });
		return { ok: true };
	} catch (error) {
		if (error instanceof DatabaseDown || isDatabaseUnavailable(error)) return { ok: false, code: 'unavailable' };
		if (error instanceof CredentialsSignin) return { ok: false, code: 'credentials' };
		throw error;
	}
}

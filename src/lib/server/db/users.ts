// Staff accounts: what sign-in and the per-request session check need.
import { db } from './index';
import type { Role } from '$lib/roles';

export interface SessionUser {
	id: number;
	storeId: number;
	name: string;
	email: string;
	role: Role;
	active: boolean;
	sessionVersion: number;
}

interface SignInRow extends SessionUser {
	passwordHash: string;
}

const sessionColumns = {
	id: 'id',
	storeId: 'store_id',
	name: 'name',
	email: 'email',
	role: 'role',
	active: 'active',
	sessionVersion: 'session_version'
};

export async function findForSignIn(email: string): Promise<SignInRow | undefined> {
	return db()('users')
		.select({ ...sessionColumns, passwordHash: 'password_hash' })
		.whereRaw('lower(email) = lower(?)', [email])
		.first();
}

export async function readForSession(id: number): Promise<SessionUser | undefined> {
	return db()('users').select(sessionColumns).where({ id }).first();
}

export async function listForStore(storeId: number): Promise<SessionUser[]> {
	return db()('users').select(sessionColumns).where({ store_id: storeId }).orderBy(['role', 'name']);
}

export async function readManyForSession(ids: number[]): Promise<SessionUser[]> {
	if (ids.length === 0) return [];
	return db()('users').select(sessionColumns).whereIn('id', ids);
}

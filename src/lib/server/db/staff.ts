// The manager's staff list: add a person, change a role, disable or enable, reset a password, set or clear a PIN.
// Each change locks the person's row, checks the version the form showed (409 otherwise) and writes its audit row
// in the same transaction. Disabling and resetting a password bump `session_version`: the person's next request is
// refused (auth.ts re-reads the user on every request) and their open streams close (live/sessions.ts). A role change
// needs no bump: the role is re-read on every request too.
import type { Knex } from 'knex';
import { db } from './index';
import * as audit from './audit';
import { inTransaction } from './transaction';
import { hashSecret } from '../passwords';
import { NotAllowedNow, NotFound, VersionConflict } from '../errors';
import type { Actor } from './actor';
import type { Role } from '$lib/roles';

export interface Person {
	id: number;
	name: string;
	email: string;
	role: Role;
	active: boolean;
	hasPin: boolean;
	version: number;
}

const columns = {
	id: 'id',
	name: 'name',
	email: 'email',
	role: 'role',
	active: 'active',
	version: 'version'
};

export async function list(storeId: number): Promise<Person[]> {
	const rows = await db()('users')
		.select({ ...columns, hasPin: db().raw('pin_hash IS NOT NULL') })
		.where({ store_id: storeId })
		.orderBy(['role', 'name', 'id']);
	return rows as Person[];
}

/** Thrown when the e-mail belongs to another account (e-mails sign people in, so they are unique). */
export class EmailTaken extends NotAllowedNow {
	constructor() {
		super('Another account already uses this e-mail.', 'email_taken');
	}
}

export async function create(
	actor: Actor,
	input: { name: string; email: string; role: Role; password: string }
): Promise<Person> {
	const passwordHash = await hashSecret(input.password);
	try {
		return await inTransaction(async (trx) => {
			const [row] = await trx('users')
				.insert({
					store_id: actor.storeId,
					name: input.name,
					email: input.email,
					role: input.role,
					password_hash: passwordHash
				})
				.returning(['id']);
			await audit.record(trx, actor, 'create', 'user', row.id, {
				name: input.name,
				email: input.email,
				role: input.role
			});
			return (await readIn(trx, actor.storeId, row.id))!;
		});
	} catch (e) {
		if ((e as { code?: string }).code === '23505') throw new EmailTaken();
		throw e;
	}
}

async function readIn(q: Knex | Knex.Transaction, storeId: number, id: number): Promise<Person | undefined> {
	return q('users')
		.select({ ...columns, hasPin: q.raw('pin_hash IS NOT NULL') })
		.where({ id, store_id: storeId })
		.first();
}

/** Locks the person, checks the version the form showed, applies `change`, bumps the version and audits it. */
async function change(
	actor: Actor,
	id: number,
	version: number,
	action: string,
	work: (current: Person) => { update: Record<string, unknown>; detail: Record<string, unknown> },
	after?: (trx: Knex.Transaction) => Promise<unknown>
): Promise<Person> {
	return inTransaction(async (trx) => {
		const current = await trx('users')
			.select({ ...columns, hasPin: trx.raw('pin_hash IS NOT NULL') })
			.where({ id, store_id: actor.storeId })
			.forUpdate()
			.first();
		if (!current) throw new NotFound('No such person in your store.');
		if (current.version !== version) throw new VersionConflict(current);
		const { update, detail } = work(current);
		await trx('users')
			.where({ id })
			.update({ ...update, version: version + 1, updated_at: trx.fn.now() });
		await after?.(trx);
		await audit.record(trx, actor, action, 'user', id, detail);
		return (await readIn(trx, actor.storeId, id))!;
	});
}

export function setRole(actor: Actor, id: number, version: number, role: Role): Promise<Person> {
	return change(actor, id, version, 'role', (current) => {
		if (id === actor.userId && role !== 'manager')
			throw new NotAllowedNow(
				'You cannot take the manager role from yourself: another manager has to do it, so the store always keeps one.'
			);
		return { update: { role }, detail: { from: current.role, to: role } };
	});
}

export function setActive(actor: Actor, id: number, version: number, active: boolean): Promise<Person> {
	return change(actor, id, version, active ? 'enable' : 'disable', () => {
		if (id === actor.userId && !active)
			throw new NotAllowedNow('You cannot disable your own account: another manager has to do it.');
		// Disabling ends every session and stream of the person at once; enabling needs a fresh sign-in anyway.
		return { update: { active, session_version: db().raw('session_version + 1') }, detail: { active } };
	});
}

export async function resetPassword(actor: Actor, id: number, version: number, password: string): Promise<Person> {
	const passwordHash = await hashSecret(password);
	// Signs the person out everywhere: whoever knew the old password is out too.
	return change(actor, id, version, 'password', () => ({
		update: { password_hash: passwordHash, session_version: db().raw('session_version + 1') },
		detail: {}
	}));
}

/** Sets a PIN for bay screens (4–8 digits), or clears it with `null`. The PIN itself is never logged. */
export async function setPin(actor: Actor, id: number, version: number, pin: string | null): Promise<Person> {
	const pinHash = pin === null ? null : await hashSecret(pin);
	return change(
		actor,
		id,
		version,
		pin === null ? 'pin.clear' : 'pin.set',
		() => ({ update: { pin_hash: pinHash }, detail: {} }),
		// A cleared or changed PIN ends the person's claims on bay screens.
		(trx) => trx('bay_claims').where({ user_id: id }).delete()
	);
}

// A shared bay screen, claimed by one person with their PIN. The screen is signed in as some staff account; the
// claim says who is standing at it, and the API acts as that person for requests that carry the claim's token
// (hooks.server.ts). A claim ends when released, when another person claims the bay, when the same person
// claims another bay, or after IDLE_MINUTES without a request. PIN failures are counted per person, in the same
// table and with the same slowing as sign-in failures.
import { createHash, randomBytes } from 'node:crypto';
import { db } from './index';
import * as audit from './audit';
import { bayViews } from './views';
import * as failures from './signin-failures';
import { inTransaction } from './transaction';
import * as events from '../live/events';
import { verifyDecoy, verifySecret } from '../passwords';
import { Forbidden, NotFound } from '../errors';
import { ApiError } from '../api';
import type { Actor } from './actor';
import type { Role } from '$lib/roles';

export const IDLE_MINUTES = 15;

export interface Claim {
	bayId: number;
	bayCode: string;
	userId: number;
	name: string;
	role: Role;
}

const digest = (token: string) => createHash('sha256').update(token).digest('hex');
const pinKey = (userId: number) => `pin:${userId}`;

/** The people who may claim a bay screen of this store: active technicians, leads and managers with a PIN set. */
export async function claimants(storeId: number): Promise<{ id: number; name: string; role: Role }[]> {
	return db()('users')
		.select('id', 'name', 'role')
		.where({ store_id: storeId, active: true })
		.whereIn('role', ['tech', 'lead', 'manager'])
		.whereNotNull('pin_hash')
		.orderByRaw("role = 'tech' DESC, name");
}

async function bayOf(storeId: number, code: string) {
	const bay = await db()('bays').select('id', 'code', 'active').where({ store_id: storeId, code }).first();
	if (!bay) throw new NotFound(`No bay ${code} in your store.`);
	return bay as { id: number; code: string; active: boolean };
}

/**
 * Checks the PIN and claims the bay for that person; returns the token the screen sends with its requests.
 * A wrong PIN and a person without a PIN get the same answer; after five failures in 15 minutes each try waits.
 */
export async function claim(
	storeId: number,
	code: string,
	userId: number,
	pin: string
): Promise<{ token: string; claim: Claim }> {
	const bay = await bayOf(storeId, code);
	// Booked before the PIN is checked, so tries in parallel cannot outrun the slowing (signin-failures.ts).
	const wait = await failures.reserveAttempt(pinKey(userId));
	if (wait > 0) {
		throw new ApiError(429, 'slowed', `Too many wrong PINs. Wait ${wait} s and try again.`, undefined, {
			'retry-after': String(wait)
		});
	}
	const user = await db()('users')
		.select('id', 'name', 'role', 'pin_hash', 'active')
		.where({ id: userId, store_id: storeId })
		.whereIn('role', ['tech', 'lead', 'manager'])
		.first();
	const ok = user?.pin_hash && user.active ? await verifySecret(user.pin_hash, pin) : await verifyDecoy(pin);
	if (!ok) {
		throw new Forbidden('That PIN is not right. Try again, or ask the lead to reset it.');
	}
	await failures.clear(pinKey(userId));
	const token = randomBytes(24).toString('base64url');
	const actor: Actor = { userId: user.id, storeId, role: user.role };
	await inTransaction(async (trx) => {
		await trx('bays').select('id').where({ store_id: storeId }).orderBy('id').forUpdate();
		// One bay per person: a claim elsewhere ends, and the person is on this bay now.
		await trx('bay_claims').where({ user_id: user.id }).whereNot({ bay_id: bay.id }).delete();
		const moved = await trx('bays')
			.where({ tech_id: user.id })
			.whereNot({ id: bay.id })
			.update({ tech_id: null })
			.returning('id');
		await trx('bays').where({ id: bay.id }).update({ tech_id: user.id });
		await trx.raw(
			`INSERT INTO bay_claims (bay_id, user_id, token_hash) VALUES (?, ?, ?)
			 ON CONFLICT (bay_id) DO UPDATE SET user_id = EXCLUDED.user_id, token_hash = EXCLUDED.token_hash,
			   claimed_at = now(), seen_at = now()`,
			[bay.id, user.id, digest(token)]
		);
		await audit.record(trx, actor, 'claim', 'bay', bay.id, { code: bay.code });
		await events.append(trx, {
			storeId,
			type: 'bay.claimed',
			entity: 'bay',
			entityId: bay.id,
			bays: await bayViews(trx, storeId, [bay.id, ...moved.map((r: { id: number }) => r.id)])
		});
	});
	return { token, claim: { bayId: bay.id, bayCode: bay.code, userId: user.id, name: user.name, role: user.role } };
}

/** Ends the claim this token holds (leaving the person on the bay for the lead to see). */
export async function release(storeId: number, token: string): Promise<void> {
	await db()('bay_claims')
		.whereIn('bay_id', db()('bays').select('id').where({ store_id: storeId }))
		.where({ token_hash: digest(token) })
		.delete();
}

/** The live claim behind a token, refreshed; undefined when it has ended or belongs to another store. */
export async function resolve(storeId: number, token: string): Promise<Claim | undefined> {
	const { rows } = await db().raw(
		`UPDATE bay_claims c SET seen_at = now()
		   FROM users u, bays b
		  WHERE c.token_hash = ? AND u.id = c.user_id AND b.id = c.bay_id AND b.store_id = ? AND u.active
		    AND c.seen_at > now() - make_interval(mins => ?)
		 RETURNING b.id AS bay_id, b.code, u.id AS user_id, u.name, u.role`,
		[digest(token), storeId, IDLE_MINUTES]
	);
	const r = rows[0];
	return r ? { bayId: r.bay_id, bayCode: r.code, userId: r.user_id, name: r.name, role: r.role } : undefined;
}

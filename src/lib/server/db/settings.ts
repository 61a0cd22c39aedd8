// A store's settings as the manager edits them: name and contact, time zone, display units, the target pace and the
// limits the bay screen checks records against. Limits are stored in SI (N, g) and shown in the store's units.
import { db } from './index';
import * as audit from './audit';
import { inTransaction } from './transaction';
import { NotFound, VersionConflict } from '../errors';
import type { Actor } from './actor';
import type { StoreUnits } from '$lib/schemas/floor';

export interface StoreSettings {
	version: number;
	name: string;
	phone: string;
	email: string;
	address: string;
	timezone: string;
	units: StoreUnits;
	targetMinPerWheel: number;
	forceLimitN: number;
	weightIncrementG: number;
	leadAllowed: boolean;
	tireAgeLimitYears: number;
	noticesEnabled: boolean;
	retorqueAfterDays: number;
}

const columns = [
	'version',
	'name',
	'phone',
	'email',
	'address',
	'timezone',
	'units',
	'target_min_per_wheel',
	'force_variation_limit_n',
	'weight_rules',
	'tire_age_limit_years',
	'notices_enabled',
	'retorque_after_days'
];

function fromRow(r: Record<string, never>): StoreSettings {
	const rules = (r.weight_rules ?? {}) as { incrementG?: number; leadAllowed?: boolean };
	return {
		version: r.version,
		name: r.name,
		phone: r.phone,
		email: r.email,
		address: r.address,
		timezone: r.timezone,
		units: r.units,
		targetMinPerWheel: Number(r.target_min_per_wheel),
		forceLimitN: Number(r.force_variation_limit_n),
		weightIncrementG: Number(rules.incrementG ?? 5),
		leadAllowed: Boolean(rules.leadAllowed),
		tireAgeLimitYears: Number(r.tire_age_limit_years),
		noticesEnabled: r.notices_enabled,
		retorqueAfterDays: Number(r.retorque_after_days)
	};
}

export async function read(storeId: number): Promise<StoreSettings | undefined> {
	const row = await db()('stores').select(columns).where({ id: storeId }).first();
	return row ? fromRow(row) : undefined;
}

/** Saves every setting at once, if the store is still at the version the form showed. */
export async function save(
	actor: Actor,
	version: number,
	next: Omit<StoreSettings, 'version'>
): Promise<StoreSettings> {
	return inTransaction(async (trx) => {
		const row = await trx('stores').select(columns).where({ id: actor.storeId }).forUpdate().first();
		if (!row) throw new NotFound('No such store.');
		const before = fromRow(row);
		if (before.version !== version) throw new VersionConflict(before);
		await trx('stores')
			.where({ id: actor.storeId })
			.update({
				name: next.name,
				phone: next.phone,
				email: next.email,
				address: next.address,
				timezone: next.timezone,
				units: JSON.stringify(next.units),
				target_min_per_wheel: next.targetMinPerWheel,
				force_variation_limit_n: next.forceLimitN,
				weight_rules: JSON.stringify({
					...row.weight_rules,
					incrementG: next.weightIncrementG,
					leadAllowed: next.leadAllowed
				}),
				tire_age_limit_years: next.tireAgeLimitYears,
				notices_enabled: next.noticesEnabled,
				retorque_after_days: next.retorqueAfterDays,
				version: version + 1,
				updated_at: trx.fn.now()
			});
		const changed = Object.fromEntries(
			(Object.keys(next) as (keyof typeof next)[])
				.filter((k) => JSON.stringify(before[k]) !== JSON.stringify(next[k]))
				.map((k) => [k, { from: before[k], to: next[k] }])
		);
		await audit.record(trx, actor, 'settings', 'store', actor.storeId, changed);
		return { ...next, version: version + 1 };
	});
}

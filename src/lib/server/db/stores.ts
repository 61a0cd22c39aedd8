// Stores: what the shell and the settings read.
import { db } from './index';

export interface StoreSummary {
	id: number;
	name: string;
	timezone: string;
	targetMinPerWheel: number;
}

export async function read(storeId: number): Promise<StoreSummary | undefined> {
	return db()('stores')
		.select({ id: 'id', name: 'name', timezone: 'timezone', targetMinPerWheel: 'target_min_per_wheel' })
		.where({ id: storeId })
		.first();
}

export interface ServiceEntry {
	code: string;
	name: string;
	standardMinutes: number;
	per: 'wheel' | 'job';
}

/** The services a writer can put on a job, in the store's order. */
export async function services(storeId: number): Promise<ServiceEntry[]> {
	return db()('services')
		.select({ code: 'code', name: 'name', standardMinutes: 'standard_minutes', per: 'per' })
		.where({ store_id: storeId, active: true })
		.orderBy(['position', 'code']);
}

/** The limits and rules the bay screen checks a wheel record against (DESIGN.md §5). */
export interface StoreRules {
	forceLimitN: number;
	weightIncrementG: number;
	leadAllowed: boolean;
	tireAgeLimitYears: number;
}

export async function rules(storeId: number): Promise<StoreRules | undefined> {
	const row = await db()('stores')
		.select('force_variation_limit_n', 'weight_rules', 'tire_age_limit_years')
		.where({ id: storeId })
		.first();
	if (!row) return undefined;
	return {
		forceLimitN: Number(row.force_variation_limit_n),
		weightIncrementG: Number(row.weight_rules?.incrementG ?? 5),
		leadAllowed: Boolean(row.weight_rules?.leadAllowed),
		tireAgeLimitYears: Number(row.tire_age_limit_years)
	};
}

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

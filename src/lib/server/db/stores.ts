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

/** Today's jobs by state, in the store's own time zone. */
export async function floorCounts(storeId: number): Promise<Record<string, number>> {
	const rows: { state: string; n: number }[] = await db()('jobs')
		.join('stores', 'stores.id', 'jobs.store_id')
		.where('jobs.store_id', storeId)
		.whereRaw('(jobs.promised_at AT TIME ZONE stores.timezone)::date = (now() AT TIME ZONE stores.timezone)::date')
		.groupBy('jobs.state')
		.select('jobs.state', db().raw('count(*)::int AS n'));
	return Object.fromEntries(rows.map((r) => [r.state, r.n]));
}

export async function bays(storeId: number): Promise<{ code: string; name: string; active: boolean }[]> {
	return db()('bays').select('code', 'name', 'active').where({ store_id: storeId }).orderBy('position');
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

// A store of its own for a test file, so tests that change the floor do not disturb the demo store or each other.
import { hash } from '@node-rs/argon2';
import { withClient } from './database';

export interface TestStore {
	id: number;
	slug: string;
	bays: { id: number; code: string }[];
	people: Record<'lead' | 'writer' | 'tech' | 'tech2' | 'manager', { id: number; email: string; password: string }>;
}

export async function createTestStore(slug: string, bayCount = 4): Promise<TestStore> {
	const password = `test-${slug}-pass`;
	const passwordHash = await hash(password);
	return withClient(async (c) => {
		await c.query('BEGIN');
		const store = await c.query(`INSERT INTO stores (slug, name, timezone) VALUES ($1, $2, 'UTC') RETURNING id`, [
			slug,
			`Test store ${slug} (invented)`
		]);
		const id = store.rows[0].id as number;
		const bays = [];
		for (let i = 1; i <= bayCount; i++) {
			const b = await c.query(
				`INSERT INTO bays (store_id, code, name, position) VALUES ($1, $2, $3, $4) RETURNING id, code`,
				[id, `T${i}`, `Test bay ${i}`, i]
			);
			bays.push(b.rows[0]);
		}
		for (const [code, per] of [
			['mount-balance', 'wheel'],
			['rotation', 'job']
		]) {
			await c.query(`INSERT INTO services (store_id, code, name, standard_minutes, per) VALUES ($1, $2, $2, 10, $3)`, [
				id,
				code,
				per
			]);
		}
		const people: Partial<TestStore['people']> = {};
		for (const [key, role] of [
			['lead', 'lead'],
			['writer', 'writer'],
			['tech', 'tech'],
			['tech2', 'tech'],
			['manager', 'manager']
		] as const) {
			const email = `${key}@${slug}.lugline.test`;
			const u = await c.query(
				`INSERT INTO users (store_id, name, email, role, password_hash) VALUES ($1, $2, $3, $4, $5) RETURNING id`,
				[id, `${key} of ${slug}`, email, role, passwordHash]
			);
			people[key] = { id: u.rows[0].id, email, password };
		}
		// The first technician is on bay 1; bay 2 has nobody on it.
		await c.query('UPDATE bays SET tech_id = $1 WHERE id = $2', [people.tech!.id, bays[0].id]);
		await c.query('COMMIT');
		return { id, slug, bays, people: people as TestStore['people'] };
	});
}

/** A job body for POST /api/jobs with a new customer. */
export function newJob(overrides: Record<string, unknown> = {}) {
	return {
		customer: { name: 'Invented Test Customer' },
		kind: 'waiter',
		promisedAt: new Date(Date.now() + 3_600_000).toISOString(),
		services: ['mount-balance'],
		...overrides
	};
}

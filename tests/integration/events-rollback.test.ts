// A change that fails after its event row was written leaves no event and streams nothing: the event, its NOTIFY
// and the change commit together or not at all.
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { db, close } from '$lib/server/db';
import * as events from '$lib/server/live/events';
import { testDatabaseUrl, withClient } from '../support/database';
import { createTestStore } from '../support/store';

afterAll(async () => {
	await close();
});

describe('events and their transaction', () => {
	it('a rolled-back change leaves no events row and sends no notification', async () => {
		const store = await createTestStore(`rollback-${process.pid}`);
		const listener = new pg.Client({ connectionString: testDatabaseUrl });
		await listener.connect();
		const heard: string[] = [];
		listener.on('notification', (n) => heard.push(n.payload ?? ''));
		await listener.query(`LISTEN ${events.CHANNEL}`);
		let writtenId = 0;
		try {
			await expect(
				db().transaction(async (trx) => {
					await trx('bays').where({ id: store.bays[0].id }).update({ name: 'Renamed, then rolled back' });
					writtenId = await events.append(trx, {
						storeId: store.id,
						type: 'bay.renamed',
						entity: 'bay',
						entityId: store.bays[0].id
					});
					throw new Error('the change fails after its event insert');
				})
			).rejects.toThrow('fails after its event insert');
			expect(writtenId).toBeGreaterThan(0);
			// A committed change afterwards proves the listener is hearing; the failed one must not be there.
			const committed = await db().transaction((trx) =>
				events.append(trx, { storeId: store.id, type: 'bay.checked', entity: 'bay', entityId: store.bays[0].id })
			);
			await expect.poll(() => heard, { timeout: 5000 }).toContain(String(committed));
			expect(heard).not.toContain(String(writtenId));
			const rows = await withClient((c) => c.query('SELECT id FROM events WHERE id = $1', [writtenId]));
			expect(rows.rowCount).toBe(0);
			const bay = await withClient((c) => c.query('SELECT name FROM bays WHERE id = $1', [store.bays[0].id]));
			expect(bay.rows[0].name).toBe('Test bay 1');
		} finally {
			await listener.end();
		}
	});
});

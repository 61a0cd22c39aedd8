// The customer search behind the palette and intake (pg_trgm): a misspelt name, words out of order, a phone
// fragment typed as bare digits, and a plate typed without its space, each find the right customer in the top 3.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { close } from '$lib/server/db';
import * as customers from '$lib/server/db/customers';
import { withClient } from '../support/database';
import { createTestStore, type TestStore } from '../support/store';

let store: TestStore;
const people = [
	{ name: 'Halvard Quennell', phone: '204-555-0147', plate: 'KTR 418' },
	{ name: 'Ottilie Barrowmere', phone: '431-555-0112', plate: 'BNW 203' },
	{ name: 'Ines Varkonyi', phone: '204-555-0190', plate: 'LLP 771' },
	{ name: 'Halvard Quist', phone: '204-555-0168', plate: 'KTR 481' }
];

beforeAll(async () => {
	store = await createTestStore(`search-${process.pid}`, 1);
	await withClient(async (c) => {
		for (const p of people) {
			const { rows } = await c.query('INSERT INTO customers (store_id, name, phone) VALUES ($1, $2, $3) RETURNING id', [
				store.id,
				p.name,
				p.phone
			]);
			await c.query('INSERT INTO customer_vehicles (customer_id, plate) VALUES ($1, $2)', [rows[0].id, p.plate]);
		}
	});
});
afterAll(async () => {
	await close();
});

const top3 = async (q: string) => (await customers.search(store.id, q)).slice(0, 3).map((c) => c.name);

describe('customer search', () => {
	it.each([
		['a misspelt name', 'otilie barowmere', 'Ottilie Barrowmere'],
		['words out of order', 'quennell halvard', 'Halvard Quennell'],
		['a phone fragment as bare digits', '5550190', 'Ines Varkonyi'],
		['a formatted phone fragment', '555-0112', 'Ottilie Barrowmere'],
		['a plate without its space', 'ktr418', 'Halvard Quennell'],
		['part of a surname', 'varkon', 'Ines Varkonyi']
	])('finds a customer by %s', async (_, query, expected) => {
		expect(await top3(query)).toContain(expected);
	});

	it('ranks the closer plate first and returns each customer with their vehicles', async () => {
		const hits = await customers.search(store.id, 'KTR 481');
		expect(hits[0].name).toBe('Halvard Quist');
		expect(hits[0].vehicles[0].plate).toBe('KTR 481');
	});

	it('never returns another store’s customers', async () => {
		const other = await createTestStore(`search-other-${process.pid}`, 1);
		expect(await customers.search(other.id, 'Halvard')).toEqual([]);
	});
});

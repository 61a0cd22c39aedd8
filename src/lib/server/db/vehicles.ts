// The vehicle wheel-fact data: a compact list for the palette's client index, and one record in full.
import type { VehicleEntry, VehicleFacts } from '$lib/schemas/vehicles';
import { db } from './index';

export async function index(): Promise<VehicleEntry[]> {
	const rows = await db()('vehicles')
		.select('id', 'year_from', 'year_to', 'make', 'model', 'trim', 'tire_front', 'tire_rear')
		.orderBy(['make', 'model', 'year_from']);
	return rows.map((v: Record<string, never>) => ({
		id: v.id,
		label: [`${v.year_from}–${v.year_to}`, v.make, v.model, v.trim].filter(Boolean).join(' '),
		sizes: [...new Set([v.tire_front, v.tire_rear])]
	}));
}

export async function read(id: number): Promise<VehicleFacts | undefined> {
	return db()('vehicles')
		.select({
			id: 'id',
			yearFrom: 'year_from',
			yearTo: 'year_to',
			make: 'make',
			model: 'model',
			trim: 'trim',
			studCount: 'stud_count',
			boltCircleMm: 'bolt_circle_mm',
			centreBoreMm: 'centre_bore_mm',
			thread: 'thread',
			hexMm: 'hex_mm',
			torqueNm: 'torque_nm',
			tireFront: 'tire_front',
			tireRear: 'tire_rear',
			placardFrontKpa: 'placard_front_kpa',
			placardRearKpa: 'placard_rear_kpa',
			tpms: 'tpms',
			notes: 'notes',
			source: 'source'
		})
		.where({ id })
		.first();
}

// Stored values are SI; screens show them in the store's chosen units (DESIGN.md §4), with the SI value beside
// when they differ, so a technician reading a maker's sheet in either system finds the number.
import { convert, type Unit } from '$lib/calc/units';
import type { StoreUnits } from '$lib/schemas/floor';

export const siUnits: StoreUnits = { pressure: 'kPa', mass: 'g', torque: 'N.m', length: 'mm', tread: 'mm', force: 'N' };

const labels: Partial<Record<Unit, string>> = { 'N.m': 'N·m', 'lbf.ft': 'lbf·ft', in32: '/32 in' };
const digits: Partial<Record<Unit, number>> = {
	kPa: 0,
	psi: 0,
	bar: 2,
	g: 0,
	oz: 2,
	'N.m': 0,
	'lbf.ft': 0,
	mm: 1,
	in: 2,
	in32: 0,
	N: 0,
	lbf: 0
};
const siOf: Record<keyof StoreUnits, Unit> = siUnits;

function one(value: number, unit: Unit): string {
	return `${value.toFixed(digits[unit] ?? 1)} ${labels[unit] ?? unit}`;
}

/** "80 lbf·ft (108 N·m)" in a store that torques in lbf·ft; "108 N·m" in one that uses N·m. */
export function show(siValue: number, quantity: keyof StoreUnits, units: StoreUnits = siUnits): string {
	const si = siOf[quantity];
	const wanted = units[quantity] as Unit;
	if (wanted === si) return one(siValue, si);
	return `${one(convert(siValue, si, wanted), wanted)} (${one(siValue, si)})`;
}

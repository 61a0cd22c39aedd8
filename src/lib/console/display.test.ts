import { describe, expect, it } from 'vitest';
import { show, siUnits } from './display';
import type { StoreUnits } from '$lib/schemas/floor';

const imperial: StoreUnits = {
	pressure: 'psi',
	mass: 'oz',
	torque: 'lbf.ft',
	length: 'in',
	tread: 'in32',
	force: 'lbf'
};

describe('values in the store’s units', () => {
	it('shows SI alone when the store uses SI', () => {
		expect(show(108, 'torque', siUnits)).toBe('108 N·m');
	});
	it('converts with the exact factors and keeps the SI value beside', () => {
		// 1 lbf·ft = 1.3558179483314004 N·m and 1 psi = 6.894757293168361 kPa (exact definitions, check-values §7).
		expect(show(108, 'torque', imperial)).toBe(`${(108 / 1.3558179483314004).toFixed(0)} lbf·ft (108 N·m)`);
		expect(show(240, 'pressure', imperial)).toBe(`${(240 / 6.894757293168361).toFixed(0)} psi (240 kPa)`);
		expect(show(114.3, 'length', imperial)).toBe(`${(114.3 / 25.4).toFixed(2)} in (114.3 mm)`);
	});
});

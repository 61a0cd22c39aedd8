import { describe, it, expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import {
	pressureAtTemperature,
	shopSetPressure,
	atmosphereKpa,
	gaugeAtAltitude,
	tpmsWarningKpa,
	geopotentialAltitudeM,
	STANDARD_ATMOSPHERE_KPA
} from './pressure';

// Exact definitions: 1 psi = 1 lbf/in² with 1 lb = 0.45359237 kg, g_n = 9.80665 m/s², 1 in = 0.0254 m; 1 atm = 101 325 Pa.
const PSI_KPA = (0.45359237 * 9.80665) / 0.0254 ** 2 / 1000;
const ATM_KPA = 101.325;
const ATM_PSI = ATM_KPA / PSI_KPA;
const psi = (kpa: number) => kpa / PSI_KPA;
const kpa = (p: number) => p * PSI_KPA;
const fToC = (f: number) => ((f - 32) * 5) / 9;

describe('pressureAtTemperature (ideal gas at constant volume, on absolute pressure: exact definition)', () => {
	it('35 psig at 20 °C reads lower at −10 °C, worked in psi and kelvin', () => {
		const expected = ((35 + ATM_PSI) * (273.15 - 10)) / (273.15 + 20) - ATM_PSI;
		expect(psi(pressureAtTemperature(kpa(35), 20, -10))).toBeCloseTo(expected, 2);
	});
	it('35 psig at 70 °F → 60 °F, worked in psi and degrees Rankine', () => {
		const expected = ((35 + ATM_PSI) * (60 + 459.67)) / (70 + 459.67) - ATM_PSI;
		expect(psi(pressureAtTemperature(kpa(35), fToC(70), fToC(60)))).toBeCloseTo(expected, 2);
	});
	it('240 kPa at 20 °C → 0 °C and → 40 °C', () => {
		expect(pressureAtTemperature(240, 20, 0)).toBeCloseTo(((240 + ATM_KPA) * 273.15) / 293.15 - ATM_KPA, 2);
		expect(pressureAtTemperature(240, 20, 40)).toBeCloseTo(((240 + ATM_KPA) * 313.15) / 293.15 - ATM_KPA, 2);
	});
	it('differs from the wrong formula that scales the gauge pressure (check-values §12 trap)', () => {
		const wrong = (35 * 263.15) / 293.15;
		const right = psi(pressureAtTemperature(kpa(35), 20, -10));
		expect(Math.abs(right - wrong)).toBeGreaterThan(1);
		expect(right).toBeLessThan(wrong);
	});
	it('uses the given atmosphere', () => {
		const high = atmosphereKpa(2000);
		expect(pressureAtTemperature(240, 20, 0, high)).toBeCloseTo(((240 + high) * 273.15) / 293.15 - high, 9);
		expect(pressureAtTemperature(240, 20, 0, high)).not.toBeCloseTo(pressureAtTemperature(240, 20, 0), 2);
	});
	it('refuses impossible inputs', () => {
		expect(() => pressureAtTemperature(240, 20, -300)).toThrow(/Final temperature of -300 °C is outside/);
		expect(() => pressureAtTemperature(240, 500, 20)).toThrow(/Starting temperature/);
		expect(() => pressureAtTemperature(-200, 20, 0)).toThrow(/below a vacuum/);
		expect(() => pressureAtTemperature(Number.NaN, 20, 0)).toThrow(RangeError);
	});

	const temp = fc.double({ min: -40, max: 80, noNaN: true });
	const gauge = fc.double({ min: 0, max: 1000, noNaN: true });
	fcTest.prop([gauge, temp, temp, temp])('temperature changes compose and undo (exact definition)', (p, a, b, c) => {
		expect(pressureAtTemperature(pressureAtTemperature(p, a, b), b, a)).toBeCloseTo(p, 9);
		expect(pressureAtTemperature(pressureAtTemperature(p, a, b), b, c)).toBeCloseTo(pressureAtTemperature(p, a, c), 9);
	});
	fcTest.prop([gauge, temp, temp])('warmer air always reads higher', (p, a, b) => {
		fc.pre(Math.abs(a - b) > 1e-6);
		expect(pressureAtTemperature(p, a, b) > p).toBe(b > a);
	});
});

describe('shopSetPressure (exact definition)', () => {
	it('sets more in a warm shop than the placard, so the tire reads the placard outside', () => {
		const set = shopSetPressure(240, -5, 20);
		expect(set).toBeCloseTo(((240 + ATM_KPA) * 293.15) / 268.15 - ATM_KPA, 9);
		expect(set).toBeGreaterThan(240);
	});
	fcTest.prop([
		fc.double({ min: 100, max: 600, noNaN: true }),
		fc.double({ min: -40, max: 45, noNaN: true }),
		fc.double({ min: 5, max: 40, noNaN: true })
	])('the tire cools back to the target', (target, outside, shop) => {
		expect(pressureAtTemperature(shopSetPressure(target, outside, shop), shop, outside)).toBeCloseTo(target, 9);
	});
	it('refuses a missing target', () => {
		expect(() => shopSetPressure(0, 0, 20)).toThrow(/Target cold pressure/);
	});
});

/** The hydrostatic equation dp/dh = −p·g0·M / (R*·T(h)) with T = T0 − L·h, integrated numerically (RK4). */
function hydrostaticPa(h: number): number {
	const g0 = 9.80665;
	const M = 0.0289644;
	const R = 8.31432;
	const f = (z: number, p: number) => (-p * g0 * M) / (R * (288.15 - 0.0065 * z));
	const steps = Math.max(1, Math.ceil(Math.abs(h) / 10));
	const dz = h / steps;
	let p = 101_325;
	for (let i = 0, z = 0; i < steps; i++, z += dz) {
		const k1 = f(z, p);
		const k2 = f(z + dz / 2, p + (dz / 2) * k1);
		const k3 = f(z + dz / 2, p + (dz / 2) * k2);
		const k4 = f(z + dz, p + dz * k3);
		p += (dz / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
	}
	return p;
}

describe('atmosphereKpa (ISO 2533 troposphere)', () => {
	it('is 1 atm at sea level (exact definition)', () => {
		expect(atmosphereKpa(0)).toBe(STANDARD_ATMOSPHERE_KPA);
		expect(STANDARD_ATMOSPHERE_KPA).toBe(ATM_KPA);
	});
	for (const h of [1000, 1500, 2000, 3000, 5000]) {
		it(`at ${h} m agrees within 1 Pa with the hydrostatic equation integrated from the ISA constants [read: constants; computed]`, () => {
			expect(Math.abs(atmosphereKpa(h) * 1000 - hydrostaticPa(h))).toBeLessThan(1);
		});
	}
	it('matches the Engineering ToolBox ISA table to its printed 4 decimals in bar, read as geometric heights [read]', () => {
		const table: [number, number][] = [
			[1000, 0.8988],
			[2000, 0.795],
			[3000, 0.7012],
			[5000, 0.5405]
		];
		// Read as geopotential heights the 5000 m row would be 29 Pa off; the table is by geometric height.
		for (const [h, bar] of table) {
			expect(Math.abs(atmosphereKpa(geopotentialAltitudeM(h)) / 100 - bar)).toBeLessThanOrEqual(0.00005);
		}
		expect(Math.abs(atmosphereKpa(5000) / 100 - 0.5405)).toBeGreaterThan(0.00005);
	});
	it('refuses altitudes outside the troposphere', () => {
		expect(() => atmosphereKpa(12_000)).toThrow(/Altitude must be between −1000 and 11000 m/);
		expect(() => atmosphereKpa(Number.NaN)).toThrow(RangeError);
	});
	fcTest.prop([fc.double({ min: -1000, max: 10_999, noNaN: true })])('falls with height', (h) => {
		expect(atmosphereKpa(h + 1)).toBeLessThan(atmosphereKpa(h));
	});
});

describe('gaugeAtAltitude (constant absolute pressure; exact definition)', () => {
	it('a tire set to 35 psig at sea level reads higher at 1000 m and 3000 m by the drop in atmosphere', () => {
		for (const h of [1000, 3000]) {
			const expected = 35 + psi(ATM_KPA - hydrostaticPa(h) / 1000);
			expect(psi(gaugeAtAltitude(kpa(35), 0, h))).toBeCloseTo(expected, 2);
		}
	});
	fcTest.prop([
		fc.double({ min: 100, max: 500, noNaN: true }),
		fc.integer({ min: 0, max: 5000 }),
		fc.integer({ min: 0, max: 5000 })
	])('going up and back down restores the reading', (p, a, b) => {
		expect(gaugeAtAltitude(gaugeAtAltitude(p, a, b), b, a)).toBeCloseTo(p, 9);
	});
});

describe('tpmsWarningKpa (49 CFR 571.138 S4.2(a): 25 % below placard or Table 1, whichever is higher)', () => {
	it('35 psi placard warns at 75 % of it', () => {
		expect(psi(tpmsWarningKpa(kpa(35)))).toBeCloseTo(0.75 * 35, 9);
	});
	it('240 kPa placard warns at 75 % of it', () => {
		expect(tpmsWarningKpa(240)).toBeCloseTo(0.75 * 240, 9);
	});
	it('24 psi on a P-metric standard-load tire warns at the 140 kPa table minimum [read: SEMA, "20 lbs for P-metric standard"]', () => {
		expect(0.75 * kpa(24)).toBeLessThan(140);
		expect(tpmsWarningKpa(kpa(24))).toBe(140);
	});
	it('takes another table minimum when given', () => {
		expect(tpmsWarningKpa(kpa(24), 160)).toBe(160);
		expect(tpmsWarningKpa(450, 320)).toBeCloseTo(0.75 * 450, 9);
	});
	it('refuses a missing placard value', () => {
		expect(() => tpmsWarningKpa(0)).toThrow(/Placard pressure must be above 0 kPa/);
		expect(() => tpmsWarningKpa(240, -1)).toThrow(/Table minimum/);
	});
});

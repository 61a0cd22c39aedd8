import { describe, it, expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import { firstHarmonic, peakToPeak, matchMount } from './uniformity';

const RAD = Math.PI / 180;
const sample = (n: number, f: (deg: number) => number) => Array.from({ length: n }, (_, k) => f((360 * k) / n));
const angleDiff = (a: number, b: number) => Math.abs(((((a - b) % 360) + 540) % 360) - 180);

describe('firstHarmonic (first-order RFV = peak-to-peak of the once-per-revolution Fourier component [read])', () => {
	// Test signal [computed]: f(θ) = 100 + 20·cos(θ − 40°) + 5·cos 2θ N at 36 points.
	const signal = sample(36, (d) => 100 + 20 * Math.cos((d - 40) * RAD) + 5 * Math.cos(2 * d * RAD));
	it('finds the 20 N wave peaking at 40° and ignores the mean and the second harmonic', () => {
		const h = firstHarmonic(signal);
		expect(h.amplitude).toBeCloseTo(20, 9);
		expect(h.peakToPeak).toBeCloseTo(2 * 20, 9);
		expect(h.highDeg).toBeCloseTo(40, 9);
	});
	it('total peak-to-peak over the samples is larger, max − min (definition [read])', () => {
		expect(peakToPeak(signal)).toBeCloseTo(Math.max(...signal) - Math.min(...signal), 12);
		expect(peakToPeak(signal)).toBeGreaterThan(firstHarmonic(signal).peakToPeak);
	});
	it('a flat trace has no first harmonic', () => {
		expect(firstHarmonic([50, 50, 50, 50]).amplitude).toBeCloseTo(0, 12);
	});
	it('refuses too few readings', () => {
		expect(() => firstHarmonic([1, 2])).toThrow(/at least 3 readings/);
		expect(() => firstHarmonic([1, Number.NaN, 2])).toThrow(RangeError);
		expect(() => peakToPeak([])).toThrow(RangeError);
	});

	const wave = fc.record({
		n: fc.integer({ min: 3, max: 128 }),
		mean: fc.double({ min: -500, max: 500, noNaN: true }),
		amp: fc.double({ min: 0.1, max: 200, noNaN: true }),
		phase: fc.double({ min: 0, max: 359.9, noNaN: true })
	});
	fcTest.prop([wave])('recovers any pure once-per-revolution wave', ({ n, mean, amp, phase }) => {
		const h = firstHarmonic(sample(n, (d) => mean + amp * Math.cos((d - phase) * RAD)));
		expect(h.amplitude).toBeCloseTo(amp, 6);
		expect(angleDiff(h.highDeg, phase)).toBeLessThan(1e-6);
	});
	fcTest.prop([wave, fc.integer({ min: 0, max: 127 })])(
		'starting the trace k readings later moves the high point back by k steps, amplitude unchanged',
		({ n, mean, amp, phase }, k) => {
			const s = sample(n, (d) => mean + amp * Math.cos((d - phase) * RAD) + 0.3 * amp * Math.sin(3 * d * RAD));
			const shift = k % n;
			const rotated = [...s.slice(shift), ...s.slice(0, shift)];
			const a = firstHarmonic(s);
			const b = firstHarmonic(rotated);
			expect(b.amplitude).toBeCloseTo(a.amplitude, 6);
			expect(angleDiff(b.highDeg, a.highDeg - (360 * shift) / n)).toBeLessThan(1e-6);
		}
	);
});

describe('matchMount (high point of tire RFV on low point of rim runout [read: trade press, service manuals]; vectors computed)', () => {
	it('tire high at 40°, rim low at 200°: turn the tire +160°', () => {
		const r = matchMount({
			tireHighDeg: 40,
			tirePeakToPeakN: 60,
			rimLowDeg: 200,
			rimRunoutPeakToPeakMm: 0.5,
			tireRateNPerMm: 200
		});
		expect(r.rotateTireDeg).toBeCloseTo(160, 9);
	});
	it('current is the vector sum with the rim peaking opposite its low point; predicted is the difference', () => {
		const m = { tireHighDeg: 40, tirePeakToPeakN: 60, rimLowDeg: 200, rimRunoutPeakToPeakMm: 0.5, tireRateNPerMm: 200 };
		const rimN = m.tireRateNPerMm * m.rimRunoutPeakToPeakMm;
		// Law of cosines: the tire's high point and the rim's high point (20°) are 20° apart.
		const current = Math.sqrt(60 ** 2 + rimN ** 2 + 2 * 60 * rimN * Math.cos((40 - 20) * RAD));
		const r = matchMount(m);
		expect(r.currentN).toBeCloseTo(current, 9);
		expect(r.predictedN).toBeCloseTo(Math.abs(60 - rimN), 9);
	});
	it('worst case: both high points together add, and the fix cancels them', () => {
		const r = matchMount({
			tireHighDeg: 90,
			tirePeakToPeakN: 80,
			rimLowDeg: 270,
			rimRunoutPeakToPeakMm: 0.4,
			tireRateNPerMm: 150
		});
		expect(r.rotateTireDeg).toBeCloseTo(180, 9);
		expect(r.currentN).toBeCloseTo(80 + 60, 9);
		expect(r.predictedN).toBeCloseTo(80 - 60, 9);
	});
	it('refuses impossible inputs', () => {
		const ok = { tireHighDeg: 0, tirePeakToPeakN: 50, rimLowDeg: 0, rimRunoutPeakToPeakMm: 0.3, tireRateNPerMm: 200 };
		expect(() => matchMount({ ...ok, tireRateNPerMm: 0 })).toThrow(/radial rate must be above 0/);
		expect(() => matchMount({ ...ok, rimRunoutPeakToPeakMm: -1 })).toThrow(/Rim runout/);
		expect(() => matchMount({ ...ok, tireHighDeg: Number.NaN })).toThrow(/tireHighDeg must be a number/);
	});

	const input = fc.record({
		tireHighDeg: fc.double({ min: -720, max: 720, noNaN: true }),
		tirePeakToPeakN: fc.double({ min: 0, max: 300, noNaN: true }),
		rimLowDeg: fc.double({ min: -720, max: 720, noNaN: true }),
		rimRunoutPeakToPeakMm: fc.double({ min: 0, max: 2, noNaN: true }),
		tireRateNPerMm: fc.double({ min: 50, max: 400, noNaN: true })
	});
	fcTest.prop([input])(
		'never predicts worse than now; the rotation is in 0–360 and lands the high point on the low point',
		(m) => {
			const r = matchMount(m);
			expect(r.rotateTireDeg).toBeGreaterThanOrEqual(0);
			expect(r.rotateTireDeg).toBeLessThan(360);
			expect(angleDiff(m.tireHighDeg + r.rotateTireDeg, m.rimLowDeg)).toBeLessThan(1e-6);
			expect(r.predictedN).toBeLessThanOrEqual(r.currentN + 1e-9);
			expect(r.predictedN).toBeCloseTo(Math.abs(m.tirePeakToPeakN - m.tireRateNPerMm * m.rimRunoutPeakToPeakMm), 6);
		}
	);
	fcTest.prop([input])('applying the rotation, then asking again, asks for no further turn', (m) => {
		const r = matchMount(m);
		const again = matchMount({ ...m, tireHighDeg: m.tireHighDeg + r.rotateTireDeg });
		expect(angleDiff(again.rotateTireDeg, 0)).toBeLessThan(1e-6);
		expect(again.currentN).toBeCloseTo(r.predictedN, 6);
	});
});

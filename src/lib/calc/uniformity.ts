/**
 * Radial force variation (RFV): the first harmonic of a loaded-roller trace, and match-mounting a tire on its rim.
 *
 * Definitions (mechanics glossary and SAE-derived wording; SAE J2657 not read): RFV is the once-per-revolution
 * variation of the normal force of a loaded, free-rolling tire at a fixed loaded radius. Its first harmonic is the
 * once-per-revolution Fourier component; first-harmonic peak-to-peak = 2 × its amplitude.
 * Match-mounting (trade press and vehicle service manuals): put the tire's first-harmonic high point on the rim's
 * runout low point. The assembly's first harmonic is the vector sum of the tire's and the rim's runout times the
 * tire's radial rate, the rim's force peaking at its runout high point, 180° from its low point.
 * Angles are in degrees measured in one direction from the valve stem, 0° at the valve.
 */

import { normalizeDeg } from './angle';

const RAD = Math.PI / 180;

export interface FirstHarmonic {
	amplitude: number;
	peakToPeak: number;
	highDeg: number;
}

/** First harmonic of samples taken at equal steps over one revolution, the first at 0°. */
export function firstHarmonic(samples: number[]): FirstHarmonic {
	const n = samples.length;
	// Three points are the fewest that can resolve a once-per-revolution wave from the mean.
	if (n < 3) throw new RangeError(`Need at least 3 readings over one revolution to find the first harmonic, got ${n}`);
	if (!samples.every(Number.isFinite)) throw new RangeError('Every reading must be a number');
	let a = 0;
	let b = 0;
	for (let k = 0; k < n; k++) {
		const theta = (2 * Math.PI * k) / n;
		a += samples[k] * Math.cos(theta);
		b += samples[k] * Math.sin(theta);
	}
	a *= 2 / n;
	b *= 2 / n;
	const amplitude = Math.hypot(a, b);
	return { amplitude, peakToPeak: 2 * amplitude, highDeg: amplitude === 0 ? 0 : normalizeDeg(Math.atan2(b, a) / RAD) };
}

/** Total (all-harmonic) peak-to-peak variation over the samples: max − min. */
export function peakToPeak(samples: number[]): number {
	if (samples.length === 0) throw new RangeError('Need at least one reading');
	if (!samples.every(Number.isFinite)) throw new RangeError('Every reading must be a number');
	return Math.max(...samples) - Math.min(...samples);
}

export interface MatchMountInput {
	/** Tire's first-harmonic high point, degrees from the valve as currently mounted. */
	tireHighDeg: number;
	/** Tire's first-harmonic peak-to-peak force variation, N. */
	tirePeakToPeakN: number;
	/** Rim's first-harmonic radial runout low point, degrees from the valve. */
	rimLowDeg: number;
	/** Rim's first-harmonic radial runout, peak-to-peak, mm. */
	rimRunoutPeakToPeakMm: number;
	/** Tire's radial spring rate, N per mm, turning rim runout into force. */
	tireRateNPerMm: number;
}

export interface MatchMountResult {
	/** Turn the tire on the rim by this much (0–360°, in the direction angles are measured). */
	rotateTireDeg: number;
	/** Assembly first-harmonic peak-to-peak force variation as mounted, N. */
	currentN: number;
	/** The same after the rotation, N. */
	predictedN: number;
}

function vector(magnitude: number, deg: number): [number, number] {
	return [magnitude * Math.cos(deg * RAD), magnitude * Math.sin(deg * RAD)];
}

export function matchMount(m: MatchMountInput): MatchMountResult {
	for (const [key, value] of Object.entries(m)) {
		if (!Number.isFinite(value)) throw new RangeError(`${key} must be a number, got ${value}`);
	}
	if (m.tirePeakToPeakN < 0) throw new RangeError(`Tire force variation must be 0 N or more, got ${m.tirePeakToPeakN}`);
	if (m.rimRunoutPeakToPeakMm < 0)
		throw new RangeError(`Rim runout must be 0 mm or more, got ${m.rimRunoutPeakToPeakMm}`);
	if (!(m.tireRateNPerMm > 0)) throw new RangeError(`Tire radial rate must be above 0 N/mm, got ${m.tireRateNPerMm}`);

	const rotateTireDeg = normalizeDeg(m.rimLowDeg - m.tireHighDeg);
	const rim = vector(m.tireRateNPerMm * m.rimRunoutPeakToPeakMm, m.rimLowDeg + 180);
	const before = vector(m.tirePeakToPeakN, m.tireHighDeg);
	const after = vector(m.tirePeakToPeakN, m.tireHighDeg + rotateTireDeg);
	return {
		rotateTireDeg,
		currentN: Math.hypot(before[0] + rim[0], before[1] + rim[1]),
		predictedN: Math.hypot(after[0] + rim[0], after[1] + rim[1])
	};
}

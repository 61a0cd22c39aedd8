/**
 * Wheel balance corrections: static and couple parts of a two-plane correction, splitting one weight into two to
 * hide it behind spokes, and rounding to the weights the store stocks.
 *
 * A correction is a weight in grams at an angle in degrees, measured in one direction from the valve stem (0° at the
 * valve), both planes at the same radius. Corrections add as vectors.
 *
 * Convention (state it, since some write C = W_o − W_i): static S = W_inner + W_outer, couple C = (W_outer − W_inner) / 2,
 * so W_inner = S/2 − C and W_outer = S/2 + C. A rigid rotor's unbalance is equally described as a resultant plus a couple,
 * or as dynamic unbalance in two planes (ISO 1940-1:2003, now ISO 21940-11); the vector algebra is exact.
 * Splitting by the law of sines: w1 = W·sin(θ2 − θ)/sin(θ2 − θ1), w2 = W·sin(θ − θ1)/sin(θ2 − θ1).
 */

import { normalizeDeg } from './angle';

export interface Correction {
	g: number;
	deg: number;
}

const RAD = Math.PI / 180;
// A result this small relative to the weights that made it is floating-point residue (20 g @0° + 20 g @180° gives
// 2e-15 g at some angle), so it is reported as no weight at 0°.
const RESIDUE = 1e-12;

function check(c: Correction, what: string) {
	if (!Number.isFinite(c.g) || !Number.isFinite(c.deg))
		throw new RangeError(`${what} needs a weight in g and an angle in degrees`);
	if (c.g < 0)
		throw new RangeError(`${what} weight must be 0 g or more, got ${c.g} g; give the angle where it goes instead`);
}

function toXY(c: Correction): [number, number] {
	return [c.g * Math.cos(c.deg * RAD), c.g * Math.sin(c.deg * RAD)];
}

function fromXY(x: number, y: number, scaleG: number): Correction {
	const g = Math.hypot(x, y);
	if (g <= RESIDUE * scaleG) return { g: 0, deg: 0 };
	return { g, deg: normalizeDeg(Math.atan2(y, x) / RAD) };
}

/** The vector sum of corrections at the same radius. */
export function addCorrections(...cs: Correction[]): Correction {
	let x = 0;
	let y = 0;
	let scale = 0;
	for (const c of cs) {
		scale += Math.abs(c.g);
		const [cx, cy] = toXY(c);
		x += cx;
		y += cy;
	}
	return fromXY(x, y, scale);
}

/** Static (the sum) and couple (half the outer-minus-inner difference) parts of a two-plane correction. */
export function staticCouple(inner: Correction, outer: Correction): { static: Correction; couple: Correction } {
	check(inner, 'Inner plane');
	check(outer, 'Outer plane');
	const [ix, iy] = toXY(inner);
	const [ox, oy] = toXY(outer);
	const scale = inner.g + outer.g;
	return { static: fromXY(ix + ox, iy + oy, scale), couple: fromXY((ox - ix) / 2, (oy - iy) / 2, scale) };
}

/** The inverse of `staticCouple`: inner = S/2 − C, outer = S/2 + C. */
export function planesFromStaticCouple(
	staticC: Correction,
	couple: Correction
): { inner: Correction; outer: Correction } {
	check(staticC, 'Static');
	check(couple, 'Couple');
	const [sx, sy] = toXY(staticC);
	const [cx, cy] = toXY(couple);
	const scale = staticC.g + couple.g;
	return { inner: fromXY(sx / 2 - cx, sy / 2 - cy, scale), outer: fromXY(sx / 2 + cx, sy / 2 + cy, scale) };
}

/**
 * Two weights at `deg1` and `deg2` with the same vector sum as `weight`, to place them behind spokes. The two
 * positions must be less than 180° apart with the weight between them; a weight exactly on one position needs no split.
 */
export function splitWeight(weight: Correction, deg1: number, deg2: number): [Correction, Correction] {
	check(weight, 'The weight to split');
	if (!Number.isFinite(deg1) || !Number.isFinite(deg2))
		throw new RangeError('Both split positions need an angle in degrees');
	const span = Math.sin((deg2 - deg1) * RAD);
	if (Math.abs(span) < 1e-9) {
		throw new RangeError(
			`Split positions ${normalizeDeg(deg1)}° and ${normalizeDeg(deg2)}° are in line with each other; choose two positions less than 180° apart on either side of the weight`
		);
	}
	let w1 = (weight.g * Math.sin((deg2 - weight.deg) * RAD)) / span;
	let w2 = (weight.g * Math.sin((weight.deg - deg1) * RAD)) / span;
	// A weight sitting on one position comes out as −1e-15 on the other; that is zero, not a refusal.
	const tolerance = 1e-9 * Math.max(1, weight.g);
	if (Math.abs(w1) < tolerance) w1 = 0;
	if (Math.abs(w2) < tolerance) w2 = 0;
	if (w1 < 0 || w2 < 0) {
		throw new RangeError(
			`The weight at ${normalizeDeg(weight.deg)}° is not between ${normalizeDeg(deg1)}° and ${normalizeDeg(deg2)}°; choose positions on either side of it, less than 180° apart`
		);
	}
	return [
		{ g: w1, deg: normalizeDeg(deg1) },
		{ g: w2, deg: normalizeDeg(deg2) }
	];
}

/**
 * Rounds a needed weight to the store's stock increment (5 g, or 0.25 oz = 7.087 g, ...): nearest, ties up. A need of
 * at least half an increment therefore never rounds to zero; below half an increment, no weight is the closer fit.
 */
export function roundWeight(g: number, incrementG: number): number {
	if (!(Number.isFinite(incrementG) && incrementG > 0)) {
		throw new RangeError(`Weight increment must be above 0 g, got ${incrementG}`);
	}
	if (!(Number.isFinite(g) && g >= 0)) throw new RangeError(`Weight must be 0 g or more, got ${g}`);
	// The epsilon keeps an exact half (2.5 of 5 g, or half of 7.087 g after division) from falling below the tie.
	const steps = Math.floor(g / incrementG + 0.5 + 1e-9);
	// Rounded to a microgram so 3 × 7.087 reads 21.261, not 21.261000000000003.
	return Math.round(steps * incrementG * 1e6) / 1e6;
}

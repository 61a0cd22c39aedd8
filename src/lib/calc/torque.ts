/**
 * Tightening order for wheel studs or lug nuts, and torque units.
 *
 * The star order brings a wheel down evenly on its hub: for an even count each stud is followed by the one
 * diametrically opposite; for an odd count each move jumps (n − 1)/2 studs, as close to opposite as an odd circle
 * allows (for five studs, every second stud: 1-3-5-2-4). Published diagrams differ in which pair comes next
 * (common practice, no source); what matters is that opposite or spread studs follow each other and every stud is
 * tightened once per pass.
 *
 * Safety: the torque value is the vehicle maker's, from its service information; nothing here replaces it. Tighten in
 * two or more passes with a calibrated torque wrench, not an impact gun alone, do the final pass with the wheel on the
 * ground, and advise a re-torque after the first drive. Replace damaged studs and nuts.
 */

import { convert } from './units';

export const STUD_COUNT_RANGE = { min: 3, max: 10 } as const;

function checkStuds(studs: number) {
	if (!Number.isInteger(studs) || studs < STUD_COUNT_RANGE.min || studs > STUD_COUNT_RANGE.max) {
		throw new RangeError(
			`Stud count must be a whole number from ${STUD_COUNT_RANGE.min} to ${STUD_COUNT_RANGE.max}, got ${studs}`
		);
	}
}

/** Order to tighten studs numbered 1..n clockwise, starting at stud 1. */
export function starSequence(studs: number): number[] {
	checkStuds(studs);
	if (studs % 2 === 1) {
		// (n − 1)/2 and n share no factor when n is odd, so the jumps visit every stud before returning to 1.
		const step = (studs - 1) / 2;
		return Array.from({ length: studs }, (_, i) => ((i * step) % studs) + 1);
	}
	const half = studs / 2;
	const starts = Array.from({ length: half }, (_, i) => i + 1);
	// Which pair comes next: with an odd number of pairs (6, 10 studs) the next pair in turn already lies two or more
	// studs from the last one tightened; with an even number (4, 8) take odd pairs first, then even, for the same
	// spread. This reproduces the common diagrams 1-3-2-4, 1-4-2-5-3-6 and 1-5-3-7-2-6-4-8.
	const firsts = half % 2 === 1 ? starts : [...starts.filter((s) => s % 2 === 1), ...starts.filter((s) => s % 2 === 0)];
	return firsts.flatMap((s) => [s, s + half]);
}

export function nmToLbfFt(nm: number): number {
	return convert(nm, 'N.m', 'lbf.ft');
}

export function lbfFtToNm(lbfFt: number): number {
	return convert(lbfFt, 'lbf.ft', 'N.m');
}

/**
 * Bolt circle (pitch circle diameter, PCD) from the spacing of adjacent studs, and back.
 *
 * Adjacent studs are a chord of the bolt circle subtending 360°/n, so s = PCD·sin(180°/n) (exact geometry; see
 * shared/reference/check-values.md §8). A public page gives "PCD = s / (2 sin 36°)" for five studs: that is the
 * radius, not the diameter. Even-stud circles can also be measured directly across opposite stud centres.
 */

function check(value: number, what: string, studs: number) {
	if (!(Number.isFinite(value) && value > 0))
		throw new RangeError(`${what} must be a positive number of mm, got ${value}`);
	if (!Number.isInteger(studs) || studs < 3 || studs > 10) {
		throw new RangeError(`Stud count must be a whole number from 3 to 10, got ${studs}`);
	}
}

/** Bolt circle diameter (mm) from the centre-to-centre distance of two neighbouring studs. */
export function boltCircleFromSpacing(spacingMm: number, studs: number): number {
	check(spacingMm, 'Stud spacing', studs);
	return spacingMm / Math.sin(Math.PI / studs);
}

/** Centre-to-centre distance (mm) of two neighbouring studs on a bolt circle. */
export function studSpacing(boltCircleMm: number, studs: number): number {
	check(boltCircleMm, 'Bolt circle', studs);
	return boltCircleMm * Math.sin(Math.PI / studs);
}

/** Angles on a wheel: degrees measured in one direction from the valve stem, 0° at the valve. */

/** The same direction expressed in 0 ≤ deg < 360. */
export function normalizeDeg(deg: number): number {
	const d = deg % 360;
	const wrapped = d < 0 ? d + 360 : d;
	// −1e-300 + 360 rounds to exactly 360, which is the valve again.
	return wrapped >= 360 ? 0 : wrapped;
}

/**
 * Inflation pressure against temperature and altitude, and the TPMS warning threshold.
 *
 * The gas law works on absolute pressure: with the air's mass and the tire's volume fixed, p_abs / T is constant, so
 * a gauge reading p_g at T1 becomes (p_g + p_atm)·T2/T1 − p_atm at T2. Scaling the gauge reading itself is a common
 * mistake and understates the change. Altitude: the absolute pressure stays, the atmosphere around the gauge changes.
 *
 * Sources: ideal gas at constant volume (exact definition); 1 atm = 101.325 kPa exactly; International Standard
 * Atmosphere troposphere, ISO 2533 / US Standard Atmosphere 1976 (g0 = 9.80665, M = 0.0289644 kg/mol,
 * R* = 8.31432 J/(mol·K), L = 0.0065 K/m, T0 = 288.15 K); 49 CFR 571.138 S4.2(a) for the TPMS threshold.
 *
 * Safety: the vehicle maker's cold inflation pressure (the placard, 49 CFR 571.110) is the value that rules. These
 * results are an aid for setting and reading pressures, not a replacement for it, and never a reason to exceed the
 * maximum pressure moulded on the tire. Inflate in a cage or with a clip-on chuck and a remote valve.
 */

export const STANDARD_ATMOSPHERE_KPA = 101.325;

const KELVIN_OFFSET = 273.15;

function kelvin(celsius: number, what: string): number {
	if (!Number.isFinite(celsius)) throw new RangeError(`${what} must be a number of °C, got ${celsius}`);
	if (celsius < -90 || celsius > 200) {
		throw new RangeError(`${what} of ${celsius} °C is outside −90 to 200 °C: check the reading and its unit`);
	}
	return celsius + KELVIN_OFFSET;
}

/** Gauge pressure after the air in the tire goes from `fromC` to `toC`, computed on absolute pressure. */
export function pressureAtTemperature(
	gaugeKpa: number,
	fromC: number,
	toC: number,
	atmosphereKpa: number = STANDARD_ATMOSPHERE_KPA
): number {
	if (!Number.isFinite(gaugeKpa)) throw new RangeError(`Gauge pressure must be a number of kPa, got ${gaugeKpa}`);
	if (!(atmosphereKpa > 0)) throw new RangeError(`Atmospheric pressure must be above 0 kPa, got ${atmosphereKpa}`);
	if (gaugeKpa < -atmosphereKpa) {
		throw new RangeError(`A gauge cannot read ${gaugeKpa} kPa: that is below a vacuum at ${atmosphereKpa} kPa ambient`);
	}
	return (
		((gaugeKpa + atmosphereKpa) * kelvin(toC, 'Final temperature')) / kelvin(fromC, 'Starting temperature') -
		atmosphereKpa
	);
}

/**
 * What to set a tire to in a warm shop (air in the tire at `shopC`) so that it reads `coldTargetKpa`, the placard
 * value, once it has cooled to `outsideC`. Let the tire reach shop temperature first; a tire fresh off the road is
 * warmer still.
 */
export function shopSetPressure(
	coldTargetKpa: number,
	outsideC: number,
	shopC: number,
	atmosphereKpa: number = STANDARD_ATMOSPHERE_KPA
): number {
	if (!(coldTargetKpa > 0)) throw new RangeError(`Target cold pressure must be above 0 kPa, got ${coldTargetKpa}`);
	return pressureAtTemperature(coldTargetKpa, outsideC, shopC, atmosphereKpa);
}

const ISA = { p0Pa: 101_325, t0K: 288.15, lapseKPerM: 0.0065, g0: 9.80665, molarMass: 0.0289644, rStar: 8.31432 };
const ISA_EXPONENT = (ISA.g0 * ISA.molarMass) / (ISA.rStar * ISA.lapseKPerM);
/** Top of the troposphere (geopotential m); above it the lapse rate changes and this formula no longer holds. */
export const TROPOPAUSE_M = 11_000;

/** Earth radius used by the US Standard Atmosphere 1976 to relate geometric and geopotential altitude. */
const EARTH_RADIUS_M = 6_356_766;

/**
 * Geopotential altitude for a geometric one (height above sea level on a map). The two differ by under 0.1 %
 * in the troposphere, which is under 0.01 psi for a tire, but tables published by geometric height need it to agree.
 */
export function geopotentialAltitudeM(geometricM: number): number {
	return (EARTH_RADIUS_M * geometricM) / (EARTH_RADIUS_M + geometricM);
}

/** Standard-atmosphere pressure (kPa) at a geopotential altitude in metres, troposphere only (ISO 2533). */
export function atmosphereKpa(altitudeM: number): number {
	if (!(altitudeM >= -1000 && altitudeM <= TROPOPAUSE_M)) {
		throw new RangeError(`Altitude must be between −1000 and ${TROPOPAUSE_M} m, got ${altitudeM}`);
	}
	return (ISA.p0Pa * (1 - (ISA.lapseKPerM * altitudeM) / ISA.t0K) ** ISA_EXPONENT) / 1000;
}

/**
 * Gauge reading after carrying a tire set to `gaugeKpa` at `fromAltitudeM` to `toAltitudeM` at the same temperature:
 * the air inside keeps its absolute pressure while the atmosphere around the gauge thins.
 */
export function gaugeAtAltitude(gaugeKpa: number, fromAltitudeM: number, toAltitudeM: number): number {
	if (!Number.isFinite(gaugeKpa)) throw new RangeError(`Gauge pressure must be a number of kPa, got ${gaugeKpa}`);
	return gaugeKpa + atmosphereKpa(fromAltitudeM) - atmosphereKpa(toAltitudeM);
}

/**
 * Pressure at or below which a TPMS must warn (49 CFR 571.138 S4.2(a)): 25 % below the placard, or the Table 1 minimum
 * for the tire type if that is higher. The default is the P-metric standard-load minimum, 140 kPa (20 psi); pass the
 * Table 1 value for extra-load or LT tires.
 */
export function tpmsWarningKpa(placardKpa: number, tableMinimumKpa = 140): number {
	if (!(placardKpa > 0)) throw new RangeError(`Placard pressure must be above 0 kPa, got ${placardKpa}`);
	if (!(tableMinimumKpa >= 0)) throw new RangeError(`Table minimum must be 0 kPa or more, got ${tableMinimumKpa}`);
	return Math.max(0.75 * placardKpa, tableMinimumKpa);
}

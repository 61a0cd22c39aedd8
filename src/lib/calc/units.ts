/**
 * Unit conversions for the quantities a tire store handles: pressure, weight (mass), torque, length and distance,
 * force and temperature.
 *
 * Every factor is exact, built from the primary definitions rather than from rounded tables: 1 in = 25.4 mm,
 * 1 ft = 0.3048 m, 1 lb = 0.453 592 37 kg (1959 international yard and pound agreement), standard gravity
 * 9.806 65 m/s² (NIST SP 811), 1 bar = 100 kPa, K = °C + 273.15 = (°F + 459.67) / 1.8.
 * `in32` is a thirty-second of an inch, the unit tread depth is read in.
 */

export type Unit =
	| 'kPa'
	| 'psi'
	| 'bar'
	| 'g'
	| 'oz'
	| 'N.m'
	| 'lbf.ft'
	| 'mm'
	| 'in'
	| 'in32'
	| 'N'
	| 'lbf'
	| 'km'
	| 'mi'
	| 'C'
	| 'F'
	| 'K';

export type Quantity = 'pressure' | 'mass' | 'torque' | 'length' | 'force' | 'temperature';

const INCH_MM = 25.4;

// The four factors below are the exact products of the primary definitions, written out so a reader can compare
// them with published values; units.test.ts recomputes each one from the definitions.

/** 1 lbf = 1 lb × g_n, in newtons. */
export const LBF_N = 4.4482216152605;
/** 1 psi = 1 lbf / in², in kilopascals. */
export const PSI_KPA = 6.894757293168361;
/** 1 avoirdupois ounce = 1/16 lb, in grams. */
export const OZ_G = 28.349523125;
/** 1 lbf·ft in newton metres. */
export const LBF_FT_NM = 1.3558179483314004;

/** Each linear unit: its quantity and its size in the quantity's base unit (kPa, g, N·m, mm, N). */
const LINEAR: Record<Exclude<Unit, 'C' | 'F' | 'K'>, { quantity: Quantity; base: number }> = {
	kPa: { quantity: 'pressure', base: 1 },
	psi: { quantity: 'pressure', base: PSI_KPA },
	bar: { quantity: 'pressure', base: 100 },
	g: { quantity: 'mass', base: 1 },
	oz: { quantity: 'mass', base: OZ_G },
	'N.m': { quantity: 'torque', base: 1 },
	'lbf.ft': { quantity: 'torque', base: LBF_FT_NM },
	mm: { quantity: 'length', base: 1 },
	in: { quantity: 'length', base: INCH_MM },
	in32: { quantity: 'length', base: INCH_MM / 32 },
	// Road distance is a length too, so mm ↔ km works; tire circumference to revolutions per mile uses it.
	km: { quantity: 'length', base: 1e6 },
	mi: { quantity: 'length', base: 5280 * 12 * INCH_MM },
	N: { quantity: 'force', base: 1 },
	lbf: { quantity: 'force', base: LBF_N }
};

export const UNITS: readonly Unit[] = [...(Object.keys(LINEAR) as Unit[]), 'C', 'F', 'K'];

export function quantityOf(unit: Unit): Quantity {
	if (unit === 'C' || unit === 'F' || unit === 'K') return 'temperature';
	const entry = LINEAR[unit];
	if (!entry) throw new RangeError(`Unknown unit "${String(unit)}". Use one of: ${UNITS.join(', ')}`);
	return entry.quantity;
}

function toKelvin(value: number, unit: 'C' | 'F' | 'K'): number {
	if (unit === 'K') return value;
	if (unit === 'C') return value + 273.15;
	return (value + 459.67) / 1.8;
}

function fromKelvin(kelvin: number, unit: 'C' | 'F' | 'K'): number {
	if (unit === 'K') return kelvin;
	if (unit === 'C') return kelvin - 273.15;
	return kelvin * 1.8 - 459.67;
}

/**
 * Converts `value` from one unit to another of the same quantity. Temperatures are absolute readings (20 °C → 68 °F),
 * not differences.
 */
export function convert(value: number, from: Unit, to: Unit): number {
	if (!Number.isFinite(value)) throw new RangeError(`The value to convert must be a number, got ${value}`);
	const qFrom = quantityOf(from);
	const qTo = quantityOf(to);
	if (qFrom !== qTo)
		throw new RangeError(`Cannot convert ${from} (${qFrom}) to ${to} (${qTo}): pick units of the same kind`);
	if (from === to) return value;
	if (qFrom === 'temperature') {
		const kelvin = toKelvin(value, from as 'C' | 'F' | 'K');
		if (kelvin < 0) {
			const label = from === 'K' ? 'K' : `°${from}`;
			throw new RangeError(`${value} ${label} is below absolute zero: check the reading`);
		}
		return fromKelvin(kelvin, to as 'C' | 'F' | 'K');
	}
	const a = LINEAR[from as keyof typeof LINEAR];
	const b = LINEAR[to as keyof typeof LINEAR];
	return (value * a.base) / b.base;
}

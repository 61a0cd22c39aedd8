// The trade's calculators as small forms over src/lib/calc: each is a list of fields and a function from their
// values to the lines of its answer. Invalid input surfaces the calc module's RangeError message, which is written
// for a technician to act on. The same definitions serve the console's focus pane and (later) the bay display.
//
// Fields and answers are in the store's units (DESIGN.md §4); the calc modules work in SI, so each field is converted
// to SI as it is read and each answer back to the store's unit, with the SI value beside it when the two differ.
// Figures the trade quotes in fixed units stay as they are read: load index in kg and lb, speed symbol in km/h and
// mph, tire sizes in their own notation.
import { staticCouple, splitWeight } from '$lib/calc/balance';
import { boltCircleFromSpacing } from '$lib/calc/bolt-circle';
import { parseDotDate } from '$lib/calc/dot-code';
import { loadIndexToKg, loadIndexToLb, speedSymbolToKmh, speedSymbolToMph } from '$lib/calc/load-speed';
import { pace } from '$lib/calc/pacing';
import { gaugeAtAltitude, pressureAtTemperature } from '$lib/calc/pressure';
import { compareTireSizes, parseTireSize } from '$lib/calc/tire-size';
import { convert, type Unit } from '$lib/calc/units';
import { siUnits } from '$lib/console/display';
import type { StoreUnits } from '$lib/schemas/floor';

export interface Field {
	name: string;
	label: string;
	value: string;
}

export interface Calculator {
	id: string;
	title: string;
	fields: Field[];
	compute(v: Record<string, string>): string[];
	/** A caution shown with the answer, where the work can hurt someone (DESIGN.md §10). */
	caution?: string;
}

export interface ImpliedUnits {
	temperature: 'C' | 'F';
	altitude: 'm' | 'ft';
	/** Road speed, for the speedometer effect of a size change. */
	speed: 'km/h' | 'mph';
}

/**
 * The units for temperature, altitude and road speed. The store's settings do not carry them yet (a later issue adds
 * them), so this one rule decides for every calculator: a store that measures length in inches reads °F, feet and
 * mph; any other store reads °C, metres and km/h.
 */
export function impliedUnits(units: StoreUnits): ImpliedUnits {
	return units.length === 'in'
		? { temperature: 'F', altitude: 'ft', speed: 'mph' }
		: { temperature: 'C', altitude: 'm', speed: 'km/h' };
}

type Quantity = keyof StoreUnits;

const SI: Record<Quantity, Unit> = siUnits;
const LABELS: Partial<Record<Unit, string>> = { 'N.m': 'N·m', 'lbf.ft': 'lbf·ft', in32: '/32 in', C: '°C', F: '°F' };
// Finer than the spec sheets in display.ts: an answer here is worked on (0.94 psi per 10 °F, a 0.58 oz split), so it
// keeps about four significant figures.
const DIGITS: Partial<Record<Unit, number>> = {
	kPa: 2,
	psi: 2,
	bar: 3,
	g: 2,
	oz: 2,
	'N.m': 1,
	'lbf.ft': 1,
	mm: 2,
	in: 3,
	in32: 1,
	N: 0,
	lbf: 1
};

const label = (unit: Unit) => LABELS[unit] ?? unit;
const storeUnit = (quantity: Quantity, units: StoreUnits) => units[quantity] as Unit;

const num = (v: string, what: string) => {
	const n = Number(v.replace(',', '.'));
	if (v.trim() === '' || !Number.isFinite(n)) throw new RangeError(`${what} must be a number`);
	return n;
};
const f = (n: number, digits = 1) => n.toFixed(digits);

/** A field typed in the store's unit, in SI for $lib/calc. */
function si(v: string, what: string, quantity: Quantity, units: StoreUnits): number {
	return convert(num(v, what), storeUnit(quantity, units), SI[quantity]);
}

/** A temperature field, in °C for $lib/calc. */
function celsius(v: string, what: string, unit: ImpliedUnits['temperature']): number {
	return convert(num(v, what), unit, 'C');
}

/** An altitude field, in metres for $lib/calc. units.ts has no foot; 1 ft = 12 in exactly. */
function metres(v: string, what: string, unit: ImpliedUnits['altitude']): number {
	const n = num(v, what);
	return unit === 'm' ? n : convert(n * 12, 'in', 'mm') / 1000;
}

/** An SI result in the store's unit, the SI value beside when they differ: "34.06 psi (234.85 kPa)". */
function amount(siValue: number, quantity: Quantity, units: StoreUnits, signed = false): string {
	const one = (value: number, unit: Unit) =>
		`${signed && value >= 0 ? '+' : ''}${value.toFixed(DIGITS[unit] ?? 2)} ${label(unit)}`;
	const base = SI[quantity];
	const wanted = storeUnit(quantity, units);
	if (wanted === base) return one(siValue, base);
	return `${one(convert(siValue, base, wanted), wanted)} (${one(siValue, base)})`;
}

const INFLATION_CAUTION =
	'Set cold pressures from the vehicle placard; inflate in a cage or with a clip-on chuck, never past the tire’s maximum.';

// Defaults are round figures in the store's own units, not conversions of the SI ones.
const PRESSURE_DEFAULT: Record<StoreUnits['pressure'], string> = { kPa: '240', psi: '35', bar: '2.4' };

/** The calculators in a store's units; SI when the store has none set. */
export function calculatorsFor(units: StoreUnits = siUnits): Calculator[] {
	const { temperature: temp, altitude: alt, speed } = impliedUnits(units);
	const pressure = label(storeUnit('pressure', units));
	const mass = label(storeUnit('mass', units));
	const length = label(storeUnit('length', units));
	const ounces = units.mass === 'oz';
	// The same day in both systems: 68 °F = 20 °C, 32 °F = 0 °C.
	const [warm, cold] = temp === 'F' ? ['68', '32'] : ['20', '0'];
	const indicated = speed === 'mph' ? 60 : 100;

	return [
		{
			id: 'pressure-temperature',
			title: 'Pressure at another temperature',
			fields: [
				{ name: 'pressure', label: `Gauge pressure (${pressure})`, value: PRESSURE_DEFAULT[units.pressure] },
				{ name: 'from', label: `Now at (${label(temp)})`, value: warm },
				{ name: 'to', label: `Will be at (${label(temp)})`, value: cold }
			],
			compute: (v) => [
				`${amount(
					pressureAtTemperature(
						si(v.pressure, 'Gauge pressure', 'pressure', units),
						celsius(v.from, 'Now at', temp),
						celsius(v.to, 'Will be at', temp)
					),
					'pressure',
					units
				)} gauge`
			],
			caution: INFLATION_CAUTION
		},
		{
			id: 'pressure-altitude',
			title: 'Gauge reading at another altitude',
			fields: [
				{ name: 'pressure', label: `Gauge pressure (${pressure})`, value: PRESSURE_DEFAULT[units.pressure] },
				{ name: 'from', label: `Set at altitude (${alt})`, value: '0' },
				{ name: 'to', label: `Read at altitude (${alt})`, value: alt === 'ft' ? '5000' : '1600' }
			],
			compute: (v) => [
				`${amount(
					gaugeAtAltitude(
						si(v.pressure, 'Gauge pressure', 'pressure', units),
						metres(v.from, 'Set at', alt),
						metres(v.to, 'Read at', alt)
					),
					'pressure',
					units
				)} gauge`
			],
			caution: INFLATION_CAUTION
		},
		{
			id: 'weight-split',
			title: 'Split a weight behind two spokes',
			fields: [
				{ name: 'weight', label: `Weight (${mass})`, value: ounces ? '1' : '30' },
				{ name: 'deg', label: 'At (° from the valve)', value: '0' },
				{ name: 'a', label: 'Spoke 1 (°)', value: '330' },
				{ name: 'b', label: 'Spoke 2 (°)', value: '30' }
			],
			compute: (v) => {
				const [a, b] = splitWeight(
					{ g: si(v.weight, 'Weight', 'mass', units), deg: num(v.deg, 'Angle') },
					num(v.a, 'Spoke 1'),
					num(v.b, 'Spoke 2')
				);
				return [`${amount(a.g, 'mass', units)} at ${f(a.deg, 0)}°`, `${amount(b.g, 'mass', units)} at ${f(b.deg, 0)}°`];
			}
		},
		{
			id: 'static-couple',
			title: 'Static and couple from two planes',
			fields: [
				{ name: 'inner', label: `Inner (${mass})`, value: ounces ? '0.75' : '20' },
				{ name: 'innerDeg', label: 'Inner at (°)', value: '0' },
				{ name: 'outer', label: `Outer (${mass})`, value: ounces ? '0.75' : '20' },
				{ name: 'outerDeg', label: 'Outer at (°)', value: '180' }
			],
			compute: (v) => {
				const r = staticCouple(
					{ g: si(v.inner, 'Inner', 'mass', units), deg: num(v.innerDeg, 'Inner angle') },
					{ g: si(v.outer, 'Outer', 'mass', units), deg: num(v.outerDeg, 'Outer angle') }
				);
				return [
					`static ${amount(r.static.g, 'mass', units)} at ${f(r.static.deg, 0)}°`,
					`couple ${amount(r.couple.g, 'mass', units)} at ${f(r.couple.deg, 0)}° (outer − inner) / 2`
				];
			}
		},
		{
			id: 'tire-compare',
			title: 'Compare two tire sizes',
			fields: [
				{ name: 'from', label: 'Fitted size', value: '225/60R16' },
				{ name: 'to', label: 'New size', value: '235/55R17' }
			],
			compute: (v) => {
				const c = compareTireSizes(parseTireSize(v.from), parseTireSize(v.to));
				// The speedometer error is a ratio, so it reads the same at a round speed in either unit.
				const ratio = c.trueKmhAtIndicated100 / 100;
				const beside = speed === 'km/h' ? '' : ` (100 km/h at ${f(100 * ratio, 2)} km/h)`;
				return [
					`diameter ${amount(c.diameterDiffMm, 'length', units, true)}, ${c.diameterDiffPct >= 0 ? '+' : ''}${f(c.diameterDiffPct, 3)} %`,
					`speedometer shows ${indicated} ${speed} at a true ${f(indicated * ratio, 2)} ${speed}${beside}`
				];
			}
		},
		{
			id: 'bolt-circle',
			title: 'Bolt circle from stud spacing',
			fields: [
				// 5 × 4.5 in is the same bolt circle as 5 × 114.3 mm: 2.645 in between adjacent studs.
				{
					name: 'spacing',
					label: `Adjacent stud centres (${length})`,
					value: units.length === 'in' ? '2.645' : '67.18'
				},
				{ name: 'n', label: 'Studs', value: '5' }
			],
			compute: (v) => [
				`bolt circle ${amount(boltCircleFromSpacing(si(v.spacing, 'Spacing', 'length', units), num(v.n, 'Studs')), 'length', units)}`
			]
		},
		{
			id: 'load-speed',
			title: 'Load index and speed symbol',
			fields: [
				{ name: 'li', label: 'Load index', value: '91' },
				{ name: 'ss', label: 'Speed symbol', value: 'H' }
			],
			compute: (v) => {
				const li = num(v.li, 'Load index');
				return [
					`${loadIndexToKg(li)} kg (${loadIndexToLb(li)} lb) per tire`,
					`${speedSymbolToKmh(v.ss.trim())} km/h (${speedSymbolToMph(v.ss.trim())} mph)`
				];
			}
		},
		{
			id: 'tire-age',
			title: 'Tire age from the DOT date code',
			fields: [{ name: 'code', label: 'DOT code or its last four digits', value: '0109' }],
			compute: (v) => {
				const d = parseDotDate(v.code);
				return [
					`week ${d.week} of ${d.year}, from ${d.weekStart.toISOString().slice(0, 10)}`,
					`up to ${f(d.ageYears, 1)} years old`
				];
			}
		},
		{
			id: 'pacing',
			title: 'Pace against the target',
			fields: [
				{ name: 'min', label: 'Minutes since starting', value: '60' },
				{ name: 'done', label: 'Wheels done', value: '4' },
				{ name: 'total', label: 'Wheels in all', value: '8' },
				{ name: 'target', label: 'Target min/wheel', value: '12' }
			],
			compute: (v) => {
				const now = new Date();
				const p = pace({
					startedAt: new Date(now.getTime() - num(v.min, 'Minutes') * 60_000),
					now,
					wheelsDone: num(v.done, 'Wheels done'),
					wheelsTotal: num(v.total, 'Wheels in all'),
					targetMinPerWheel: num(v.target, 'Target')
				});
				const ahead = Math.round(p.aheadMin);
				return [
					ahead >= 0 ? `${ahead} min ahead of target` : `${-ahead} min behind target`,
					`${f(p.expectedDone, 1)} wheels expected by now`
				];
			}
		}
	];
}

/** Each field's starting value, by name. */
export function defaultValues(c: Calculator): Record<string, string> {
	return Object.fromEntries(c.fields.map((field) => [field.name, field.value]));
}

/** The answer lines, or the reason there is none. */
export function answer(c: Calculator, values: Record<string, string>): { lines: string[] } | { error: string } {
	try {
		return { lines: c.compute(values) };
	} catch (e) {
		return { error: e instanceof Error ? e.message : String(e) };
	}
}

// What the bay screen says about a wheel record as it is filled in: flags where a value is past a legal minimum, the
// store's policy or the vehicle's value, each with its source, and the safety cautions that apply (DESIGN.md §10).
// Also the edge conversions between the form's store units and the SI values the record keeps.
// Pure functions over a (possibly partial) record: the screen runs them on every change, the server can too.
import { parseDotDate } from '$lib/calc/dot-code';
import { roundWeight } from '$lib/calc/balance';
import { REPAIR_CAUTION, PUNCTURE_MAX_DIAMETER_MM, repairCheck } from '$lib/calc/repair';
import { convert, type Unit } from '$lib/calc/units';
import { siUnits } from '$lib/console/display';
import type { StoreUnits } from '$lib/schemas/floor';
import type { RecordFields } from '$lib/schemas/record';

export interface Flag {
	/** The field it is about, as a zod issue path is joined: `treadDepthMm`, `weights.2.grams`, `damage.puncture`. */
	field: string;
	/** `stop`: the wheel should not leave like this. `warn`: tell the customer or check again. */
	level: 'warn' | 'stop';
	message: string;
	/** Where the limit comes from, shown beside the message. */
	source: string;
}

export interface FlagContext {
	today: Date;
	/** The store's tire-age policy in years. */
	tireAgeLimitYears: number;
	/** The store's force-variation limit, N. */
	forceLimitN: number;
	leadAllowed: boolean;
	/** The vehicle maker's lug torque, N·m; null when the vehicle data has none. */
	vehicleTorqueNm: number | null;
	/** The store's smallest weight step, g. */
	weightIncrementG: number;
	/** A front wheel of a bus, truck or truck tractor: 4/32 in minimum (49 CFR 393.75(b)). Unknown: false. */
	busOrTruckFront?: boolean;
	/** Units the messages show values in (SI beside); SI when left out. */
	units?: StoreUnits;
}

/** A record as the screen holds it: any field may be missing or blank. */
export type PartialRecord = Partial<RecordFields>;

// ------------------------------------------------------------------ limits and their sources

/** EU minimum in the main grooves, Directive 89/459/EEC (check-values §5). */
export const EU_MIN_TREAD_MM = 1.6;
/** US treadwear indicators, FMVSS 109/119, and 49 CFR 393.75(c): 2/32 in = 1.5875 mm (check-values §5). */
export const US_MIN_TREAD_MM = convert(2, 'in32', 'mm');
/** 49 CFR 393.75(b): front wheels of a bus, truck or truck tractor, 4/32 in = 3.175 mm (check-values §5). */
export const US_FRONT_HEAVY_MIN_TREAD_MM = convert(4, 'in32', 'mm');
/** Torque applied may differ from the vehicle's value by this fraction before it is flagged (common practice). */
export const TORQUE_TOLERANCE = 0.05;

const TREAD_SOURCE =
	'EU: Directive 89/459/EEC, at least 1.6 mm in the main grooves (wear indicators at 1.6 mm, UN R30). US: treadwear ' +
	'indicators at 2/32 in (FMVSS 109/119, NHTSA letter 11497); 49 CFR 393.75(c) 2/32 in, 393.75(b) 4/32 in on the ' +
	'front wheels of a bus or truck; state laws commonly 2/32 in.';
const AGE_SOURCE =
	'Store policy. Tire age limits are policy, not law: the tire industry (USTMA) says calendar age alone does not ' +
	'predict service life; some tire makers advise replacement 10 years after manufacture. Date code: 49 CFR 574.5.';
const FORCE_SOURCE = 'Store setting: force-variation limit (first-harmonic radial force variation).';
const TORQUE_SOURCE = `Vehicle maker's value from the vehicle data; the ±${TORQUE_TOLERANCE * 100} % tolerance is common practice, no published source.`;
const WEIGHT_SOURCE = 'Store setting: weight increment; nearest stocked weight by roundWeight (nearest, ties up).';
const REPAIR_SOURCE =
	'Puncture-repair limits for passenger and light-truck tires (USTMA wall chart, as quoted by a tire maker and ' +
	"dealers); the tire maker's policy may be stricter.";

// ------------------------------------------------------------------ store units ↔ SI at the edge

const SI: Record<keyof StoreUnits, Unit> = siUnits;

/** The record's measured values and the store-unit quantity each is entered in. Angles are degrees everywhere. */
export const fieldQuantity = {
	treadDepthMm: 'tread',
	pressureSetKpa: 'pressure',
	forceBeforeN: 'force',
	forceAfterN: 'force',
	torqueAppliedNm: 'torque',
	/** `weights[i].grams` */
	weightGrams: 'mass',
	/** `damage.puncture.diameterMm` */
	punctureDiameterMm: 'length'
} as const satisfies Record<string, keyof StoreUnits>;
export type MeasuredField = keyof typeof fieldQuantity;

/** The unit the store enters `field` in. */
export function unitOf(field: MeasuredField, units: StoreUnits): Unit {
	return units[fieldQuantity[field]];
}

/** A value typed in the store's unit, in SI; null (a cleared field) stays null. */
export function toSi(field: MeasuredField, value: number | null, units: StoreUnits): number | null {
	if (value === null) return null;
	return convert(value, unitOf(field, units), SI[fieldQuantity[field]]);
}

/** An SI value in the store's unit, for the form; null stays null. */
export function fromSi(field: MeasuredField, value: number | null, units: StoreUnits): number | null {
	if (value === null) return null;
	return convert(value, SI[fieldQuantity[field]], unitOf(field, units));
}

const LABELS: Partial<Record<Unit, string>> = { 'N.m': 'N·m', 'lbf.ft': 'lbf·ft', in32: '/32 in' };

/**
 * What was typed in a field, in SI: blank is null (clears the field), a comma works as the decimal mark, and a
 * tread depth in 32nds may be typed as `5/32`. Throws a RangeError naming the unit for anything else.
 */
export function readInput(field: MeasuredField, text: string, units: StoreUnits): number | null {
	const unit = unitOf(field, units);
	let t = text.trim().replace(',', '.');
	if (t === '') return null;
	if (unit === 'in32') t = t.replace(/\s*\/\s*32\s*(in)?$/i, '');
	const value = /^[+-]?(\d+\.?\d*|\.\d+)$/.test(t) ? Number(t) : NaN;
	if (!Number.isFinite(value)) {
		throw new RangeError(`"${text.trim()}" is not a number: enter the value in ${LABELS[unit] ?? unit}`);
	}
	return toSi(field, value, units);
}

// ------------------------------------------------------------------ showing values in messages

// Enough digits to tell a value from the limit it is compared with (1.59 mm against 1.6 mm), trailing zeros dropped.
const DIGITS: Partial<Record<Unit, number>> = {
	kPa: 0,
	psi: 1,
	bar: 2,
	g: 1,
	oz: 2,
	'N.m': 0,
	'lbf.ft': 0,
	mm: 2,
	in: 3,
	in32: 1,
	N: 0,
	lbf: 1
};

function one(value: number, unit: Unit): string {
	const text = String(Number(value.toFixed(DIGITS[unit] ?? 2)));
	return unit === 'in32' ? `${text}/32 in` : `${text} ${LABELS[unit] ?? unit}`;
}

/** A limit in 32nds written out in mm: 2/32 in is 1.5875 mm, not the 1.59 mm rounding shows (3.175 would print 3.17). */
const exact = (mm: number) => `${Number(mm.toFixed(4))} mm`;

/** "1.9/32 in (1.5 mm)" in a store that reads 32nds, "1.5 mm" in one that reads mm. */
function show(si: number, quantity: keyof StoreUnits, units: StoreUnits | undefined): string {
	const base = SI[quantity];
	const wanted = units?.[quantity] ?? base;
	if (wanted === base) return one(si, base);
	return `${one(convert(si, base, wanted), wanted)} (${one(si, base)})`;
}

// ------------------------------------------------------------------ flags

function checkContext(c: FlagContext) {
	if (!(c.today instanceof Date) || Number.isNaN(c.today.getTime())) throw new RangeError('Today must be a valid date');
	if (!(c.tireAgeLimitYears > 0))
		throw new RangeError(`Tire age limit must be above 0 years, got ${c.tireAgeLimitYears}`);
	if (!(c.forceLimitN > 0)) throw new RangeError(`Force-variation limit must be above 0 N, got ${c.forceLimitN}`);
	if (!(c.weightIncrementG > 0)) throw new RangeError(`Weight increment must be above 0 g, got ${c.weightIncrementG}`);
}

const present = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v);

function treadFlags(d: number, c: FlagContext): Flag[] {
	const u = c.units;
	if (d < EU_MIN_TREAD_MM) {
		return [
			{
				field: 'treadDepthMm',
				level: 'stop',
				message:
					`Tread ${show(d, 'tread', u)} is below the minimum: ${one(EU_MIN_TREAD_MM, 'mm')} in the EU, ` +
					`2/32 in (${exact(US_MIN_TREAD_MM)}) where the US wear bars show. Replace the tire. ` +
					'The front wheels of a bus or truck need 4/32 in.',
				source: TREAD_SOURCE
			}
		];
	}
	if (c.busOrTruckFront && d < US_FRONT_HEAVY_MIN_TREAD_MM) {
		return [
			{
				field: 'treadDepthMm',
				level: 'stop',
				message:
					`Tread ${show(d, 'tread', u)} is below 4/32 in (${exact(US_FRONT_HEAVY_MIN_TREAD_MM)}), ` +
					'the minimum on the front wheels of a bus or truck. Replace the tire.',
				source: TREAD_SOURCE
			}
		];
	}
	return [];
}

function dotFlags(code: string, c: FlagContext): Flag[] {
	try {
		const made = parseDotDate(code, c.today);
		if (made.ageYears <= c.tireAgeLimitYears) return [];
		return [
			{
				field: 'dotCode',
				level: 'warn',
				message:
					`Tire made in week ${made.week} of ${made.year} is ${made.ageYears.toFixed(1)} years old, past the ` +
					`store's limit of ${c.tireAgeLimitYears} years: advise the customer to replace it.`,
				source: AGE_SOURCE
			}
		];
	} catch (e) {
		// A three-digit (pre-2000) code, or one that no longer reads: say what the parser says.
		return [{ field: 'dotCode', level: 'warn', message: messageOf(e), source: AGE_SOURCE }];
	}
}

function forceFlags(r: PartialRecord, c: FlagContext): Flag[] {
	if (!present(r.forceAfterN) || r.forceAfterN <= c.forceLimitN) return [];
	const next = r.matchMounted
		? "it is already match-mounted: check the rim's runout or try another tire."
		: "match-mount the tire (turn its high point to the rim's low point) and measure again.";
	return [
		{
			field: 'forceAfterN',
			level: 'warn',
			message: `Force variation after ${show(r.forceAfterN, 'force', c.units)} is over the store's limit of ${show(c.forceLimitN, 'force', c.units)}: ${next}`,
			source: FORCE_SOURCE
		}
	];
}

function torqueFlags(applied: number, c: FlagContext): Flag[] {
	const u = c.units;
	const wanted = c.vehicleTorqueNm;
	if (wanted === null || !(wanted > 0)) {
		return [
			{
				field: 'torqueAppliedNm',
				level: 'warn',
				message:
					`Torque applied ${show(applied, 'torque', u)}, but the vehicle data has no torque value: check it ` +
					"against the vehicle maker's service information.",
				source: "Vehicle maker's service information (no value in the vehicle data)."
			}
		];
	}
	const diff = applied - wanted;
	// The epsilon keeps exactly 5 % off from being flagged by floating-point residue.
	if (Math.abs(diff) <= TORQUE_TOLERANCE * wanted + 1e-9) return [];
	const side = diff < 0 ? 'below' : 'above';
	const fix =
		diff < 0
			? 're-torque in the star order with a calibrated torque wrench.'
			: 'loosen and re-torque in the star order with a calibrated torque wrench; replace any stud or nut that was stretched or damaged.';
	return [
		{
			field: 'torqueAppliedNm',
			level: 'stop',
			message:
				`Torque applied ${show(applied, 'torque', u)} is ${show(Math.abs(diff), 'torque', u)} ${side} the vehicle's ` +
				`${show(wanted, 'torque', u)} (more than the ${TORQUE_TOLERANCE * 100} % allowed): ${fix}`,
			source: TORQUE_SOURCE
		}
	];
}

function weightFlags(r: PartialRecord, c: FlagContext): Flag[] {
	const flags: Flag[] = [];
	const inc = c.weightIncrementG;
	(r.weights ?? []).forEach((w, i) => {
		const steps = w.grams / inc;
		// A weight entered in ounces comes back as 21.26214234375 g: a millionth of a step is residue, not an odd size.
		if (Math.abs(steps - Math.round(steps)) <= 1e-6) return;
		const nearest = roundWeight(w.grams, inc);
		const what = `Weight ${i + 1} (${w.plane}, ${w.type}, ${show(w.grams, 'mass', c.units)})`;
		flags.push({
			field: `weights.${i}.grams`,
			level: 'warn',
			message:
				nearest === 0
					? `${what} is under half the store's smallest step of ${show(inc, 'mass', c.units)}: leaving it off is the closer fit; re-check the balance.`
					: `${what} is not a multiple of the store's ${show(inc, 'mass', c.units)} step: the nearest stocked weight is ${show(nearest, 'mass', c.units)}.`,
			source: WEIGHT_SOURCE
		});
	});
	return flags;
}

function punctureFlags(r: PartialRecord): Flag[] {
	const p = r.damage?.puncture;
	if (!p) return [];
	try {
		const advice = repairCheck({ ...p, treadDepthMm: present(r.treadDepthMm) ? r.treadDepthMm : null });
		if (advice.repairable) return [];
		return [
			{
				field: 'damage.puncture',
				level: 'stop',
				message: `${advice.scrap ? 'Scrap the tire' : 'Puncture not repairable'}: ${advice.reasons.join(' ')}`,
				source: REPAIR_SOURCE
			}
		];
	} catch (e) {
		return [{ field: 'damage.puncture', level: 'warn', message: messageOf(e), source: REPAIR_SOURCE }];
	}
}

function messageOf(e: unknown): string {
	return e instanceof Error ? e.message : String(e);
}

/**
 * Every flag on the record, in the order the bay screen lists the fields. Fields left out or blank raise nothing.
 * Throws a RangeError when the store's settings in `context` are not usable (a limit of 0, an invalid date).
 */
export function flagsOf(record: PartialRecord, context: FlagContext): Flag[] {
	checkContext(context);
	return [
		...(present(record.treadDepthMm) ? treadFlags(record.treadDepthMm, context) : []),
		...(record.dotCode ? dotFlags(record.dotCode, context) : []),
		...weightFlags(record, context),
		...forceFlags(record, context),
		...(present(record.torqueAppliedNm) ? torqueFlags(record.torqueAppliedNm, context) : []),
		...punctureFlags(record)
	];
}

// ------------------------------------------------------------------ cautions (DESIGN.md §10)

export type CautionTopic = 'inflation' | 'torque' | 'repair' | 'lead weights';

export interface Caution {
	topic: CautionTopic;
	/** The field the screen shows it beside. */
	field: string;
	text: string;
}

/** The cautions in full, for a screen that shows one beside its field before anything is entered. */
export const CAUTIONS: Record<CautionTopic, Caution> = {
	inflation: {
		topic: 'inflation',
		field: 'pressureSetKpa',
		text:
			'Inflate in a cage or with a clip-on chuck and a remote valve, standing clear. Never go past the maximum ' +
			"pressure moulded on the tire to seat a bead. Set the vehicle maker's cold pressure from the placard."
	},
	torque: {
		topic: 'torque',
		field: 'torqueAppliedNm',
		text:
			"Torque the lug nuts to the vehicle maker's value with a calibrated torque wrench in the star order, in two or " +
			'more passes, the last with the wheel on the ground; not with an impact gun alone. Replace damaged studs and ' +
			'nuts rather than reuse them. Advise a re-torque after the first 50–100 miles (80–160 km): common practice.'
	},
	repair: {
		topic: 'repair',
		field: 'damage.puncture',
		text: `Repair only in the tread area and only injuries up to ${PUNCTURE_MAX_DIAMETER_MM} mm (1/4 in) across. ${REPAIR_CAUTION}`
	},
	'lead weights': {
		topic: 'lead weights',
		field: 'weights',
		text:
			'This store does not fit lead weights: use steel or zinc weights, and follow local rules for lead weights ' +
			'taken off a wheel.'
	}
};

/**
 * The cautions that apply to what the record holds: inflation once a pressure is set, torque and re-torque once a
 * torque is recorded, repair limits for a puncture, lead weights when weights are fitted in a store that bans lead
 * (assumed when the store's rule is not given: the caution is the safer default).
 */
export function cautionsFor(
	record: PartialRecord,
	context: Pick<FlagContext, 'leadAllowed'> = { leadAllowed: false }
): Caution[] {
	const cautions: Caution[] = [];
	if (present(record.pressureSetKpa)) cautions.push(CAUTIONS.inflation);
	if (present(record.torqueAppliedNm)) cautions.push(CAUTIONS.torque);
	if (record.damage?.puncture || record.damage?.tire?.includes('puncture')) cautions.push(CAUTIONS.repair);
	if (!context.leadAllowed && (record.weights?.length ?? 0) > 0) cautions.push(CAUTIONS['lead weights']);
	return cautions;
}

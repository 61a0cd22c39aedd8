/**
 * Whether a puncture in a passenger or light-truck tire may be repaired, by the industry's published limits.
 *
 * Source: the USTMA (formerly RMA) wall chart "Puncture Repair Procedures for Passenger and Light Truck Tires", as
 * quoted by a tire maker's consumer page and by dealer pages citing it; the chart itself was not read
 * (../shared/reference/check-values.md §11, [2nd]):
 * - injury at most 1/4 in (6 mm) across;
 * - repairs only in the tread area; none in the sidewall, shoulder or belt-edge area, none of an injury running at an
 *   angle into the shoulder;
 * - repairs must not overlap; a tire with an existing improper repair is scrapped;
 * - tread worn to 2/32 in: do not repair (one page citing USTMA, [2nd]).
 * The bead is not tread area, so a bead injury is refused under the tread-area rule.
 *
 * Size limit: the chart gives 1/4 in and, as its metric figure, 6 mm; 1/4 in is exactly 6.35 mm. This check uses
 * 6 mm. Where one source prints two limits the stricter one governs, because this answer is advice that the tire
 * maker's own policy may only tighten. It also means an injury measured as exactly 1/4 in in an inch store is refused
 * with a reason that names both figures, so the technician sees why.
 *
 * Left out on purpose: "½ in from the shoulder" and "speed rating lost after repair" appear on single secondary pages
 * and are maker policy, not the chart's rules; the 3/8 in limit for steel-belted truck tires is outside these rules.
 * The repair method itself (demount, inspect inside, rubber stem and patch) is in REPAIR_CAUTION, not checked here.
 */

import { convert } from './units';

export const punctureLocations = ['tread', 'shoulder', 'sidewall', 'bead'] as const;
export type PunctureLocation = (typeof punctureLocations)[number];

/** Largest injury the chart allows, in mm: its metric figure, stricter than 1/4 in = 6.35 mm (see above). */
export const PUNCTURE_MAX_DIAMETER_MM = 6;
/** 1/4 in in mm, named in the reason when an injury falls between the two figures. */
const QUARTER_INCH_MM = convert(0.25, 'in', 'mm');
/** Tread worn to this depth (2/32 in = 1.5875 mm) is not repaired. */
export const REPAIR_MIN_TREAD_MM = convert(2, 'in32', 'mm');
// The record keeps tread depth to 0.01 mm (numeric(5,2)), so 2/32 in is saved as 1.59 mm. Half that step of slack
// keeps a reading of exactly 2/32 in at the limit after a save instead of passing as 0.0025 mm above it.
const TREAD_STORAGE_SLACK_MM = 0.005;

export interface RepairInput {
	/** Where the injury is: only the tread area can be repaired. */
	location: PunctureLocation;
	/** The injury's diameter in mm (after cleaning it out to sound rubber). */
	diameterMm: number;
	/** The injury runs at an angle into the shoulder. */
	angled?: boolean;
	/** Remaining tread depth in mm, if measured. */
	treadDepthMm?: number | null;
	/** The repair would overlap an earlier repair. */
	overlapsRepair?: boolean;
	/** The tire already carries an improper repair (a plug alone, a patch alone, an on-wheel repair, ...). */
	improperRepair?: boolean;
}

export interface RepairAdvice {
	repairable: boolean;
	/** Why not, one line per rule broken, for the technician; empty when repairable. */
	reasons: string[];
	/** The tire must be scrapped, not only left unrepaired: it carries an improper repair. */
	scrap: boolean;
}

/** Shown with every answer: the chart is the floor, the tire maker's policy rules (DESIGN.md §10). */
export const REPAIR_CAUTION =
	'Advice from the industry limits for passenger and light-truck tires; the tire maker’s repair policy rules and may be ' +
	'stricter (speed rating, run-flat tires, distance from the shoulder). Demount the tire and inspect it inside: no ' +
	'on-wheel or outside-in repairs. Fill the injury with a rubber stem and seal the inner liner with a patch (a ' +
	'one-piece unit is common): a plug alone or a patch alone is not a repair, and an inner tube never replaces one. ' +
	'Follow local rules for scrap tires.';

const mm = (value: number) => `${value.toFixed(1)} mm`;
const in32 = (valueMm: number) => `${convert(valueMm, 'mm', 'in32').toFixed(1)}/32 in`;

const locationReasons: Record<Exclude<PunctureLocation, 'tread'>, string> = {
	shoulder:
		'Injury in the shoulder or belt-edge area: not repairable. Repairs are limited to the tread area; replace the tire.',
	sidewall: 'Injury in the sidewall: not repairable. Repairs are limited to the tread area; replace the tire.',
	bead: 'Injury at the bead: not repairable. Repairs are limited to the tread area; replace the tire.'
};

/**
 * Checks an injury against every rule and lists each one it breaks, so the technician sees all of them at once.
 * Throws a RangeError for input that is not a measurement (no location, a diameter of 0 mm or less).
 */
export function repairCheck(input: RepairInput): RepairAdvice {
	const { location, diameterMm, angled = false, treadDepthMm = null } = input;
	if (!(punctureLocations as readonly string[]).includes(location)) {
		throw new RangeError(`Say where the injury is: ${punctureLocations.join(', ')}`);
	}
	if (!(Number.isFinite(diameterMm) && diameterMm > 0)) {
		throw new RangeError(`Measure the injury's diameter in mm (above 0), got ${diameterMm}`);
	}
	if (treadDepthMm !== null && !(Number.isFinite(treadDepthMm) && treadDepthMm >= 0)) {
		throw new RangeError(`Tread depth must be 0 mm or more, got ${treadDepthMm}`);
	}

	const reasons: string[] = [];
	if (input.improperRepair) {
		reasons.push('The tire carries an improper earlier repair: scrap it. Do not repair it again or refit it.');
	}
	if (location !== 'tread') reasons.push(locationReasons[location]);
	if (angled) reasons.push('The injury runs at an angle into the shoulder: not repairable; replace the tire.');
	if (diameterMm > PUNCTURE_MAX_DIAMETER_MM) {
		reasons.push(
			diameterMm <= QUARTER_INCH_MM
				? `Injury is ${mm(diameterMm)} across: within 1/4 in (${QUARTER_INCH_MM} mm) but over the chart's metric ` +
						`limit of ${PUNCTURE_MAX_DIAMETER_MM} mm, so it is treated as too large; replace the tire unless the tire ` +
						'maker allows it.'
				: `Injury is ${mm(diameterMm)} across: over the ${PUNCTURE_MAX_DIAMETER_MM} mm (1/4 in) limit; replace the tire.`
		);
	}
	if (treadDepthMm !== null && treadDepthMm <= REPAIR_MIN_TREAD_MM + TREAD_STORAGE_SLACK_MM) {
		reasons.push(
			`Tread is worn to ${treadDepthMm.toFixed(2)} mm (${in32(treadDepthMm)}), at or below 2/32 in: ` +
				'do not repair a worn-out tire; replace it.'
		);
	}
	if (input.overlapsRepair) reasons.push('The repair would overlap an earlier repair: repairs must not overlap.');
	return { repairable: reasons.length === 0, reasons, scrap: Boolean(input.improperRepair) };
}

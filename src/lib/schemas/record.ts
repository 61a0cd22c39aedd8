// The wheel record as the bay screen saves it, in parts, and as the server returns it. Every value is SI (mm, kPa, g,
// N, N·m, degrees from the valve stem); the screen converts from the store's units at the edge ($lib/record/flags).
// In a save, a field left out keeps what earlier saves recorded and null clears it where a blank makes sense.
import { z } from 'zod';
import { parseDotDate } from '$lib/calc/dot-code';
import { punctureLocations } from '$lib/calc/repair';

/** Our own plain words for what a technician sees on a tire and on a rim. */
export const tireDamageKinds = [
	'puncture',
	'sidewall cut',
	'bulge',
	'tread separation',
	'bead damage',
	'uneven wear',
	'cracking'
] as const;
export const rimDamageKinds = ['bent', 'cracked', 'curb rash', 'corrosion', 'bead seat damage'] as const;
export const weightPlanes = ['inner', 'outer'] as const;
export const weightTypes = ['clip', 'adhesive'] as const;

export const NOTES_MAX = 2000;
export const WEIGHTS_MAX = 8;
/** One weight above this is a misreading (a pound typed as grams, an extra digit), not a correction. */
export const WEIGHT_MAX_G = 200;

/** A number within [min, max] with messages that name the field, its unit and what to check. */
function measure(what: string, unit: string, min: number, max: number, tooHigh: string, tooLow?: string) {
	return z
		.number({ error: `${what} must be a number in ${unit}` })
		.min(min, tooLow ?? `${what} cannot be negative`)
		.max(max, tooHigh);
}

/** A strict object whose unknown keys are named back with the ones it does take. */
function strict<T extends z.ZodRawShape>(shape: T, what: string) {
	const known = Object.keys(shape).join(', ');
	return z.strictObject(shape, {
		error: (iss) => {
			if (iss.code === 'unrecognized_keys') {
				const keys = iss.keys.map((k) => `"${k}"`).join(', ');
				return `Unknown field${iss.keys.length > 1 ? 's' : ''} ${keys} in ${what}: it takes ${known}`;
			}
			if (iss.code === 'invalid_type') return `Send ${what} as an object with ${known}`;
			return undefined;
		}
	});
}

const angle = (what: string) =>
	measure(
		what,
		'degrees from the valve stem',
		0,
		360,
		`${what} runs from 0 to 360° round from the valve stem`,
		`${what} runs from 0 to 360° round from the valve stem`
	);

export const weightSchema = strict(
	{
		plane: z.enum(weightPlanes, { error: 'Say which plane the weight is on: inner or outer' }),
		type: z.enum(weightTypes, { error: 'Say how the weight is fixed: clip or adhesive' }),
		grams: z
			.number({ error: 'The weight must be a number in g' })
			.positive('A weight must be more than 0 g; remove the line instead')
			.max(WEIGHT_MAX_G, `A single weight over ${WEIGHT_MAX_G} g is not a sane reading; check the amount and the unit`),
		angleDeg: angle('The weight’s angle')
	},
	'a weight'
);

export const punctureSchema = strict(
	{
		location: z.enum(punctureLocations, {
			error: `Say where the injury is: ${punctureLocations.join(', ')}`
		}),
		diameterMm: z
			.number({ error: 'The injury’s diameter must be a number in mm' })
			.positive('Measure the injury’s diameter: it must be more than 0 mm')
			.max(50, 'An injury over 50 mm across is a cut, not a puncture: record it as sidewall cut or tread damage'),
		angled: z.boolean({ error: 'Angled is yes or no: does the injury run at an angle into the shoulder?' }).optional(),
		overlapsRepair: z.boolean({ error: 'Overlaps a repair is yes or no' }).optional(),
		improperRepair: z.boolean({ error: 'Improper earlier repair is yes or no' }).optional()
	},
	'the puncture'
);

const once = <T>(list: T[]) => new Set(list).size === list.length;

/** Damage is saved whole: a save that sends it replaces what was recorded. `{ tire: [], rim: [] }` clears it. */
export const damageSchema = strict(
	{
		tire: z
			.array(z.enum(tireDamageKinds, { error: `Tire damage is one of: ${tireDamageKinds.join(', ')}` }))
			.refine(once, 'Tick each kind of tire damage only once')
			.default([]),
		rim: z
			.array(z.enum(rimDamageKinds, { error: `Rim damage is one of: ${rimDamageKinds.join(', ')}` }))
			.refine(once, 'Tick each kind of rim damage only once')
			.default([]),
		puncture: punctureSchema.optional()
	},
	'the damage'
);

// The date-code group of a TIN, read the way parseDotDate reads it: the last group when the TIN is written in
// groups, else the trailing digits (four at most).
function dateCodeOf(cleaned: string): string {
	const groups = cleaned.replace(/^DOT\s*/, '').split(/[\s-]+/);
	const last = groups[groups.length - 1];
	if (groups.length > 1 || /^\d{3,4}$/.test(last)) return last;
	const trailing = /\d+$/.exec(last)?.[0] ?? '';
	return trailing.length > 4 ? trailing.slice(-4) : trailing;
}

/**
 * A full TIN (`DOT U2LL LMLR 2319`) or only its date code (`2319`), trimmed, upper-cased, spaces collapsed. The date
 * code must be a real production week that has started. A three-digit code (made before 2000, decade unknown) is
 * kept: the tire exists and its record must say so; $lib/record/flags flags its age.
 */
export const dotCodeSchema = z
	.string({ error: 'Enter the DOT code as text, e.g. DOT U2LL LMLR 2319, or only its last four digits, 2319' })
	.trim()
	.toUpperCase()
	.overwrite((s) => s.replace(/\s+/g, ' '))
	.min(1, 'Enter the DOT code, or its last four digits (week then year, e.g. 2319)')
	.max(40, 'A DOT code is at most 13 letters and digits after "DOT"; check what was typed')
	.regex(/^[A-Z0-9 -]+$/, 'A DOT code has only letters and digits, e.g. DOT U2LL LMLR 2319')
	.superRefine((code, ctx) => {
		const dateCode = dateCodeOf(code);
		if (/^\d{3}$/.test(dateCode)) return;
		if (/^\d{4}$/.test(dateCode)) {
			const week = Number(dateCode.slice(0, 2));
			if (week < 1 || week > 53) {
				ctx.addIssue({
					code: 'custom',
					message: `DOT week ${dateCode.slice(0, 2)} does not exist: the last four digits are week then year, e.g. 2319`
				});
				return;
			}
		}
		try {
			parseDotDate(code);
		} catch (e) {
			ctx.addIssue({ code: 'custom', message: e instanceof Error ? e.message : String(e) });
		}
	});

// Control characters other than newline and tab: NUL, escape sequences, backspace, DEL and the C1 range.
const CONTROL = /[^\P{Cc}\n\t]/u;

export const notesSchema = z
	.string({ error: 'Notes must be text' })
	// A textarea posts line breaks as CR LF; keep them as plain newlines.
	.overwrite((s) => s.replace(/\r\n?/g, '\n'))
	.trim()
	.max(NOTES_MAX, `Notes are at most ${NOTES_MAX} characters; shorten them or attach a photo`)
	.refine((s) => !CONTROL.test(s), 'Notes contain a control character (pasted from another program?); retype them');

const fieldNames = [
	'treadDepthMm',
	'dotCode',
	'pressureSetKpa',
	'weights',
	'forceBeforeN',
	'forceAfterN',
	'matchMounted',
	'matchMountDeg',
	'torqueAppliedNm',
	'damage',
	'notes'
] as const;

export const recordPatchSchema = strict(
	{
		version: z
			.number({ error: 'Send the record version the screen showed (0 when there is no record yet)' })
			.int('The record version is a whole number')
			.min(0, 'The record version is 0 or more')
			.max(2_147_483_647, 'The record version is out of range; reload the wheel'),
		treadDepthMm: measure(
			'Tread depth',
			'mm',
			0,
			20,
			'Tread depth over 20 mm is not a passenger or light-truck reading; check the unit (mm or 32nds)'
		)
			.nullable()
			.optional(),
		dotCode: dotCodeSchema.nullable().optional(),
		pressureSetKpa: measure(
			'Pressure',
			'kPa',
			0,
			700,
			'Pressure over 700 kPa (about 100 psi) is beyond a passenger or light-truck tire; check the reading and the unit'
		)
			.nullable()
			.optional(),
		weights: z
			.array(weightSchema, { error: 'Send the weights as a list' })
			.max(WEIGHTS_MAX, `At most ${WEIGHTS_MAX} weights on one wheel; combine them or re-check the balance`)
			.optional(),
		forceBeforeN: measure(
			'Force variation before',
			'N',
			0,
			2000,
			'Force variation over 2000 N (about 450 lbf) is not a sane reading; check the amount and the unit'
		)
			.nullable()
			.optional(),
		forceAfterN: measure(
			'Force variation after',
			'N',
			0,
			2000,
			'Force variation over 2000 N (about 450 lbf) is not a sane reading; check the amount and the unit'
		)
			.nullable()
			.optional(),
		matchMounted: z.boolean({ error: 'Match-mounted is yes or no' }).optional(),
		matchMountDeg: angle('The match-mount rotation').nullable().optional(),
		torqueAppliedNm: measure(
			'Torque applied',
			'N·m',
			0,
			1000,
			'Torque over 1000 N·m (about 740 lbf·ft) is not a wheel torque; check the amount and the unit'
		)
			.nullable()
			.optional(),
		// Not nullable: the column holds an object; `{ tire: [], rim: [] }` clears it.
		damage: damageSchema.optional(),
		notes: notesSchema.optional()
	},
	'the wheel record'
)
	.refine((p) => fieldNames.some((f) => p[f] !== undefined), {
		message: 'Nothing to save: enter at least one measurement'
	})
	.refine((p) => !(p.matchMounted === false && typeof p.matchMountDeg === 'number'), {
		message: 'A rotation is only recorded for a match-mounted tire: tick match-mounted or clear the rotation',
		path: ['matchMountDeg']
	});

export type RecordPatch = z.infer<typeof recordPatchSchema>;
/** What a screen sends, before defaults (damage lists may be left out). */
export type RecordPatchInput = z.input<typeof recordPatchSchema>;
export type WheelWeight = z.infer<typeof weightSchema>;
export type Puncture = z.infer<typeof punctureSchema>;
export type Damage = z.infer<typeof damageSchema>;
export type TireDamage = (typeof tireDamageKinds)[number];
export type RimDamage = (typeof rimDamageKinds)[number];

/** The record's measured and recorded fields, SI, as stored; blank ones are null. */
export interface RecordFields {
	treadDepthMm: number | null;
	dotCode: string | null;
	pressureSetKpa: number | null;
	weights: WheelWeight[];
	forceBeforeN: number | null;
	forceAfterN: number | null;
	matchMounted: boolean;
	matchMountDeg: number | null;
	torqueAppliedNm: number | null;
	damage: Damage;
	notes: string;
}

/** One wheel's record as the server returns it; version 0 and updatedAt null when nothing is recorded yet. */
export interface RecordView extends RecordFields {
	wheelId: number;
	version: number;
	recordedBy: { id: number; name: string } | null;
	updatedAt: string | null;
}

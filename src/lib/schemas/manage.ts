// The manager's forms: staff, bays, services and store settings. Each schema reads a form's strings as they come
// (FormData values) and says, field by field, what to fix. Shared by the actions and their pages.
import { z } from 'zod';
import { roles } from '$lib/roles';
import type { StoreUnits } from './floor';

/** The first message per field, as a page shows it beside the field. */
export function fieldErrors(error: z.ZodError): Record<string, string> {
	const errors: Record<string, string> = {};
	for (const issue of error.issues) {
		const field = String(issue.path[0] ?? 'form');
		errors[field] ??= issue.message;
	}
	return errors;
}

/** A form's fields as strings (a missing field reads as ''), for validation and for showing back what was typed. */
export function formValues(form: FormData, fields: readonly string[]): Record<string, string> {
	return Object.fromEntries(
		fields.map((f) => {
			const v = form.get(f);
			return [f, typeof v === 'string' ? v : ''];
		})
	);
}

/** The largest value of PostgreSQL's `integer`, the type of every id and version column. */
const INT4_MAX = 2_147_483_647;
// Past INT4_MAX the database refuses the query (500): an id or version that large was never on a page.
const id = z.coerce
	.number({ error: 'Missing row id' })
	.int('Missing row id')
	.positive('Missing row id')
	.max(INT4_MAX, 'No such row: reload the page');
const version = z.coerce
	.number({ error: 'The form did not say which version it showed: reload the page' })
	.int()
	.positive('The form did not say which version it showed: reload the page')
	.max(INT4_MAX, 'The form did not say which version it showed: reload the page');
const checkbox = z.string().transform((v) => v === 'on' || v === 'true');

// ---- Staff -------------------------------------------------------------------------------------------------

const name = z.string().trim().min(1, 'Enter a name').max(100, 'At most 100 characters');
const email = z
	.string()
	.trim()
	.toLowerCase()
	.pipe(z.email('Enter an e-mail address like name@example.com'))
	.pipe(z.string().max(254, 'At most 254 characters'));
const role = z.enum(roles, { error: `Pick one of: ${roles.join(', ')}` });
const password = z.string().min(12, 'At least 12 characters').max(200, 'At most 200 characters');

export const PASSWORD_MIN = 12;

export const newPersonSchema = z.object({ name, email, role, password });
export const personFields = ['name', 'email', 'role', 'password'] as const;

export const roleChangeSchema = z.object({ id, version, role });
export const personRefSchema = z.object({ id, version });
export const passwordResetSchema = z.object({ id, version, password });
/** A PIN for a bay screen: 4 to 8 digits; empty clears it. */
export const pinSchema = z.object({
	id,
	version,
	pin: z
		.string()
		.trim()
		.regex(/^(\d{4,8})?$/, 'A PIN is 4 to 8 digits (leave empty to clear it)')
});

// ---- Bays --------------------------------------------------------------------------------------------------

/**
 * A bay code as written on the wall. It must fit both the `[code=code]` route matcher (src/params/code.ts) and the
 * database's check (letters, digits and dash, at most 12), so the stricter of the two.
 */
export const bayCode = z
	.string()
	.trim()
	.regex(/^[A-Za-z0-9][A-Za-z0-9-]{0,11}$/, 'Letters, digits and dashes, starting with a letter or digit, at most 12');
const bayName = z.string().trim().min(1, 'Enter a name').max(60, 'At most 60 characters');

export const newBaySchema = z.object({ code: bayCode, name: bayName });
export const renameBaySchema = z.object({ id, version, name: bayName });
export const bayRefSchema = z.object({ id, version });

// ---- Services ----------------------------------------------------------------------------------------------

export const serviceFields = ['code', 'name', 'standardMinutes', 'per', 'needsBalance', 'active'] as const;

export const serviceSchema = z.object({
	code: z
		.string()
		.trim()
		.regex(/^[a-z0-9][a-z0-9-]{0,31}$/, 'Lower-case letters, digits and dashes, at most 32'),
	name: z.string().trim().min(1, 'Enter a name').max(80, 'At most 80 characters'),
	standardMinutes: z
		.string()
		.trim()
		.min(1, 'Enter the standard minutes')
		.transform(Number)
		.pipe(z.number({ error: 'Enter a number of minutes' }).min(0, 'Zero or more').max(600, 'At most 600')),
	per: z.enum(['wheel', 'job'], { error: 'Per wheel or per job' }),
	needsBalance: checkbox,
	active: checkbox
});
export const serviceEditSchema = serviceSchema.extend({ id, version });
export type ServiceInput = z.infer<typeof serviceSchema>;

// ---- Store settings ----------------------------------------------------------------------------------------

export const unitChoices = {
	pressure: ['psi', 'kPa', 'bar'],
	mass: ['oz', 'g'],
	torque: ['lbf.ft', 'N.m'],
	length: ['in', 'mm'],
	tread: ['in32', 'mm'],
	force: ['lbf', 'N']
} as const satisfies { [K in keyof StoreUnits]: readonly StoreUnits[K][] };

export const unitLabels: Record<keyof StoreUnits, string> = {
	pressure: 'Pressure',
	mass: 'Weights (mass)',
	torque: 'Torque',
	length: 'Length',
	tread: 'Tread depth',
	force: 'Force'
};

/** Whether the running JavaScript knows the zone (the IANA names Intl supports). */
export function isTimeZone(zone: string): boolean {
	return (Intl.supportedValuesOf('timeZone') as string[]).includes(zone) || zone === 'UTC';
}

const positive = (what: string, max: number) =>
	z
		.string()
		.trim()
		.min(1, `Enter ${what}`)
		.transform(Number)
		.pipe(
			z
				.number({ error: `Enter ${what} as a number` })
				.positive('More than zero')
				.max(max, `At most ${max}`)
		);
const wholeNumber = (what: string, min: number, max: number) =>
	z
		.string()
		.trim()
		.min(1, `Enter ${what}`)
		.transform(Number)
		.pipe(
			z
				.number({ error: `Enter ${what} as a whole number` })
				.int('A whole number')
				.min(min, `At least ${min}`)
				.max(max, `At most ${max}`)
		);

export const settingsFields = [
	'version',
	'name',
	'phone',
	'email',
	'address',
	'timezone',
	'pressure',
	'mass',
	'torque',
	'length',
	'tread',
	'force',
	'targetMinPerWheel',
	'forceLimit',
	'weightIncrement',
	'leadAllowed',
	'tireAgeLimitYears',
	'noticesEnabled',
	'retorqueAfterDays'
] as const;

/** Limits as typed: the force limit in the chosen force unit and the weight increment in the chosen mass unit. */
export const settingsSchema = z.object({
	version,
	name: z.string().trim().min(1, 'Enter the store name').max(100, 'At most 100 characters'),
	phone: z.string().trim().max(40, 'At most 40 characters'),
	email: z.union([
		z.literal(''),
		z.string().trim().toLowerCase().pipe(z.email('Enter an e-mail address or leave it empty'))
	]),
	address: z.string().trim().max(300, 'At most 300 characters'),
	timezone: z.string().trim().refine(isTimeZone, 'Pick a time zone from the list (e.g. America/Chicago)'),
	pressure: z.enum(unitChoices.pressure, { error: 'Pick a unit' }),
	mass: z.enum(unitChoices.mass, { error: 'Pick a unit' }),
	torque: z.enum(unitChoices.torque, { error: 'Pick a unit' }),
	length: z.enum(unitChoices.length, { error: 'Pick a unit' }),
	tread: z.enum(unitChoices.tread, { error: 'Pick a unit' }),
	force: z.enum(unitChoices.force, { error: 'Pick a unit' }),
	targetMinPerWheel: positive('the target minutes per wheel', 240),
	forceLimit: positive('the force-variation limit', 10_000),
	weightIncrement: positive('the weight increment', 100),
	leadAllowed: checkbox,
	tireAgeLimitYears: wholeNumber('the tire-age limit', 1, 30),
	noticesEnabled: checkbox,
	retorqueAfterDays: wholeNumber('the re-torque days', 0, 60)
});
export type SettingsInput = z.infer<typeof settingsSchema>;

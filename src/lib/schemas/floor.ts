// The live floor's API bodies, shared by the server routes and the client. Types via z.infer.
import { z } from 'zod';

export const wheelPositions = ['LF', 'RF', 'LR', 'RR', 'SP'] as const;
export const jobKinds = ['waiter', 'drop_off'] as const;
export const jobStates = ['waiting', 'in_progress', 'done', 'collected', 'cancelled'] as const;
export const wheelStates = ['queued', 'working', 'done'] as const;

export type WheelPosition = (typeof wheelPositions)[number];
export type JobKind = (typeof jobKinds)[number];
export type JobState = (typeof jobStates)[number];
export type WheelState = (typeof wheelStates)[number];

const id = z
	.number({ error: 'Must be a number' })
	.int('Must be a whole number')
	.positive('Must be a positive id')
	.max(2_147_483_647);
const version = z.number({ error: 'Send the version the screen showed' }).int().positive().max(2_147_483_647);
const trimmed = (max: number, what: string) =>
	z.string().trim().max(max, `${what} is too long (at most ${max} characters)`);
const isoInstant = z.iso.datetime({
	offset: true,
	error: 'Use an ISO 8601 date and time with a time zone, e.g. 2026-12-02T15:30:00Z'
});

/** Notes are free text from the counter; long enough for a pasted history, short enough to keep a row sane. */
export const NOTES_MAX = 120_000;

export const newCustomerSchema = z.strictObject({
	name: trimmed(200, 'The name').min(1, 'Enter the customer’s name'),
	phone: trimmed(40, 'The phone number').default(''),
	email: z.union([z.literal(''), z.email('Enter an e-mail address like name@example.com').max(254)]).default(''),
	notifyEmail: z.boolean().default(false)
});

export const createJobSchema = z
	.strictObject({
		customerId: id.optional(),
		customer: newCustomerSchema.optional(),
		customerVehicleId: id.optional(),
		vehicleId: id.optional(),
		plate: trimmed(16, 'The plate').optional(),
		services: z.array(trimmed(32, 'A service code').min(1)).max(20, 'At most 20 services').default([]),
		wheels: z
			.array(z.enum(wheelPositions, { error: 'Wheel positions are LF, RF, LR, RR and SP' }))
			.min(1, 'Choose at least one wheel')
			.max(5)
			.refine((w) => new Set(w).size === w.length, 'Each wheel position only once')
			.optional(),
		kind: z.enum(jobKinds, { error: 'Choose waiter or drop_off' }),
		promisedAt: isoInstant,
		priority: z.number().int().min(0).max(9).default(0),
		notes: trimmed(NOTES_MAX, 'The notes').default('')
	})
	.refine((j) => (j.customerId === undefined) !== (j.customer === undefined), {
		message: 'Give either an existing customerId or a new customer, not both',
		path: ['customerId']
	});
export type CreateJob = z.infer<typeof createJobSchema>;

export const patchJobSchema = z
	.strictObject({
		version,
		kind: z.enum(jobKinds).optional(),
		promisedAt: isoInstant.optional(),
		priority: z.number().int().min(0).max(9).optional(),
		notes: trimmed(NOTES_MAX, 'The notes').optional(),
		/** Only the transitions a person makes: cancel a job not started, hand a done job back (collected). */
		state: z.enum(['cancelled', 'collected'], { error: 'A job can be set to cancelled or collected here' }).optional()
	})
	.refine((p) => Object.keys(p).length > 1, { message: 'Nothing to change: send at least one field besides version' });
export type PatchJob = z.infer<typeof patchJobSchema>;

/**
 * A wheel's new place and state, as fields (not an action name):
 *   { bayId, queuePosition? }   move into a bay at a place in its queue (default: the end)
 *   { bayId: null }             take it back to the waiting line
 *   { state: 'working' }        start;   { state: 'done' } finish;   { state: 'queued' } reopen a done wheel
 */
export const patchWheelSchema = z
	.strictObject({
		version,
		bayId: id.nullable().optional(),
		queuePosition: z.number().int().min(1, 'Queue places start at 1').max(10_000).optional(),
		state: z.enum(wheelStates, { error: 'A wheel is queued, working or done' }).optional()
	})
	.refine((p) => p.bayId !== undefined || p.state !== undefined || p.queuePosition !== undefined, {
		message: 'Nothing to change: send bayId, queuePosition or state'
	})
	.refine((p) => !(p.state !== undefined && (p.bayId !== undefined || p.queuePosition !== undefined)), {
		message: 'Move a wheel and change its state in two steps'
	})
	.refine((p) => !(p.bayId === null && p.queuePosition !== undefined), {
		message: 'The waiting line has no queue places',
		path: ['queuePosition']
	});
export type PatchWheel = z.infer<typeof patchWheelSchema>;

export const moveWheelsSchema = z.strictObject({
	wheels: z
		.array(z.strictObject({ id, version }))
		.min(1, 'Choose at least one wheel')
		.max(50, 'At most 50 wheels at once')
		.refine((w) => new Set(w.map((x) => x.id)).size === w.length, 'Each wheel only once'),
	bayId: id.nullable(),
	queuePosition: z.number().int().min(1).max(10_000).optional()
});
export type MoveWheels = z.infer<typeof moveWheelsSchema>;

export const streamRequestSchema = z.strictObject({
	cursor: z.number().int().min(0).max(Number.MAX_SAFE_INTEGER)
});

// ------------------------------------------------------------------ what the server sends

export interface JobView {
	id: number;
	number: number;
	state: JobState;
	kind: JobKind;
	promisedAt: string;
	priority: number;
	/** The first few hundred characters: the board and the stream never carry a long history to every screen. */
	notesPreview: string;
	version: number;
	createdAt: string;
	startedAt: string | null;
	doneAt: string | null;
	customer: { id: number; name: string; phone: string };
	vehicle: { id: number; label: string } | null;
	plate: string;
	services: string[];
}

/** One job in full, for its own page and the focus pane. */
export interface JobDetail extends JobView {
	notes: string;
	wheels: WheelView[];
}

export interface WheelView {
	id: number;
	jobId: number;
	position: WheelPosition;
	bayId: number | null;
	queuePosition: number | null;
	state: WheelState;
	techId: number | null;
	startedAt: string | null;
	finishedAt: string | null;
	version: number;
}

export interface BayView {
	id: number;
	code: string;
	name: string;
	position: number;
	active: boolean;
	techId: number | null;
	techName: string | null;
}

/** One change on the floor: the rows it touched, in their new state. Applying it upserts them by id. */
export interface FloorEvent {
	id: number;
	type: string;
	at: string;
	jobs: JobView[];
	wheels: WheelView[];
	bays: BayView[];
}

/** The store's display units (stored values are always SI). */
export interface StoreUnits {
	pressure: 'kPa' | 'psi' | 'bar';
	mass: 'g' | 'oz';
	torque: 'N.m' | 'lbf.ft';
	length: 'mm' | 'in';
	tread: 'mm' | 'in32';
	force: 'N' | 'lbf';
}

/**
 * The floor in one snapshot. Each job and each wheel is sent once (`jobs`, `wheels`); bays and the waiting line
 * refer to them by id, in order, which keeps the snapshot small on a floor with a thousand wheels.
 */
export interface BoardSnapshot {
	store: { id: number; name: string; timezone: string; targetMinPerWheel: number; units?: StoreUnits };
	/** Bays in order, each with its queued and working wheels in queue order. */
	bays: (BayView & { wheelIds: number[] })[];
	/** Jobs with a wheel not yet in a bay, by promised time, with those wheels. */
	waiting: { jobId: number; wheelIds: number[] }[];
	jobs: JobView[];
	/** Every wheel of the jobs above, done ones included. */
	wheels: WheelView[];
	counters: { wheelsDone: number; wheelsPlanned: number; minPerWheel: number | null };
	cursor: number;
}

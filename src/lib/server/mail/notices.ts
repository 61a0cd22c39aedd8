// The customer notices, as plain text and HTML, from the facts an outbox row keeps (its `payload`). Pure: no
// database, no network. The facts are captured when the notice is written (the store's name, contact and units at
// that moment, the wheel records as they were), so what the sender renders later is what the outbox page shows.
// The HTML is ours alone: no images, no remote resources, no tracking of any kind; the only links are the store's
// own `tel:` and `mailto:`. Everything interpolated is escaped, and every string that reaches a header is one line.
import { z } from 'zod';
import { parseDotDate } from '$lib/calc/dot-code';
import { show } from '$lib/console/display';
import type { StoreUnits } from '$lib/schemas/floor';

export const noticeKinds = ['ready', 'retorque', 'summary'] as const;
export type NoticeKind = (typeof noticeKinds)[number];

export const noticeLabels: Record<NoticeKind, string> = {
	ready: 'ready for pickup',
	retorque: 're-torque reminder',
	summary: 'service summary'
};

/** Why the re-torque reminder exists, said the same way in every notice that mentions it. */
export const RETORQUE_PRACTICE =
	'Re-checking the lug nut torque after the first 50–100 miles (80–160 km) is common practice: a wheel can settle ' +
	'against its hub, and a nut that has lost tension can work loose.';

const unitsSchema = z.object({
	pressure: z.enum(['kPa', 'psi', 'bar']),
	mass: z.enum(['g', 'oz']),
	torque: z.enum(['N.m', 'lbf.ft']),
	length: z.enum(['mm', 'in']),
	tread: z.enum(['mm', 'in32']),
	force: z.enum(['N', 'lbf'])
}) satisfies z.ZodType<StoreUnits>;

const wheelSchema = z.object({
	position: z.string(),
	treadDepthMm: z.number().nullable(),
	dotCode: z.string().nullable(),
	pressureSetKpa: z.number().nullable(),
	torqueAppliedNm: z.number().nullable(),
	damage: z.object({
		tire: z.array(z.string()),
		rim: z.array(z.string()),
		puncture: z.object({ location: z.string(), diameterMm: z.number() }).optional()
	})
});
export type WheelFacts = z.infer<typeof wheelSchema>;

/** One line, for every fact that goes into a subject, a greeting or a sentence (see oneLine below). */
const line = (max = 200) => z.string().transform((value) => oneLine(value, max));

/** What an outbox row's payload holds. Validated when read back: a row written by an older version still renders. */
export const factsSchema = z.object({
	store: z.object({
		name: line(),
		phone: line(60),
		email: line(254),
		// An address typed on several lines reads as one: "1 Main St, Springfield".
		address: z.string().transform((value) => oneLine(value.replace(/\s*[\r\n]+\s*/g, ', '), 300)),
		timezone: z.string()
	}),
	job: z.object({
		number: z.number().int(),
		doneAt: z.string().nullable(),
		vehicle: line().nullable(),
		plate: line(40),
		services: z.array(line()).default([])
	}),
	customer: z.object({ name: line() }),
	/** Ready notices: when the reminder follows (0: none). */
	retorqueAfterDays: z.number().int().min(0).default(0),
	/** Summaries: the store's display units and the wheels' records (SI). */
	units: unitsSchema.optional(),
	wheels: z.array(wheelSchema).default([])
});
export type NoticeFacts = z.input<typeof factsSchema>;

export interface RenderedNotice {
	subject: string;
	text: string;
	html: string;
}

/**
 * One line of at most `max` characters with no control characters: CR and LF in a name or a subject would otherwise
 * start a new header. nodemailer encodes what it is given; this makes sure there is nothing left to encode away.
 */
export function oneLine(value: string, max = 200): string {
	const flat = value
		.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]+/g, ' ')
		.replace(/\s+/g, ' ')
		.trim();
	return flat.length > max ? `${flat.slice(0, max - 1)}…` : flat;
}

export function escapeHtml(value: string): string {
	return value.replace(
		/[&<>"']/g,
		(c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] as string
	);
}

const positions: Record<string, string> = {
	LF: 'left front',
	RF: 'right front',
	LR: 'left rear',
	RR: 'right rear',
	SP: 'spare'
};

function when(iso: string | null, timezone: string): string {
	if (!iso) return '';
	const at = new Date(iso);
	const format = (timeZone: string) =>
		new Intl.DateTimeFormat('en-US', { timeZone, dateStyle: 'medium', timeStyle: 'short' }).format(at);
	try {
		return format(timezone);
	} catch {
		return `${format('UTC')} UTC`; // a time zone this runtime does not know
	}
}

/** A measured value in the store's unit with SI beside, as the screens show it ("6/32 in (5.0 mm)"). */
function measured(si: number | null, quantity: keyof StoreUnits, units: StoreUnits | undefined): string {
	if (si === null) return 'not recorded';
	return show(si, quantity, units).replace(/ \/32 in/g, '/32 in');
}

function tireAge(dotCode: string | null, doneAt: string | null): string {
	if (!dotCode) return 'not recorded';
	try {
		const made = parseDotDate(dotCode, doneAt ? new Date(doneAt) : new Date());
		return `made in week ${made.week} of ${made.year}, ${made.ageYears.toFixed(1)} years old`;
	} catch (e) {
		// A three-digit (pre-2000) code says so in the parser's words; anything else is shown as read.
		const message = e instanceof Error ? e.message : String(e);
		return /before 2000/.test(message) ? 'made before 2000: over 20 years old' : `date code ${dotCode}`;
	}
}

function damageOf(w: WheelFacts, units: StoreUnits | undefined): string {
	const parts: string[] = [];
	if (w.damage.tire.length) parts.push(`tire: ${w.damage.tire.join(', ')}`);
	if (w.damage.rim.length) parts.push(`rim: ${w.damage.rim.join(', ')}`);
	const p = w.damage.puncture;
	if (p) parts.push(`puncture in the ${p.location}, ${measured(p.diameterMm, 'length', units)} across`);
	return parts.length ? parts.join('; ') : 'none found';
}

interface Section {
	heading?: string;
	lines: string[];
}

interface Letter {
	subject: string;
	greeting: string;
	body: Section[];
	/** Rows of the wheel table (summaries only): position, then label/value pairs. */
	wheels?: { position: string; values: [string, string][] }[];
	after?: Section[];
}

function contact(f: z.output<typeof factsSchema>): string[] {
	const s = f.store;
	return [s.name, s.address, s.phone && `Phone ${s.phone}`, s.email && `E-mail ${s.email}`].filter(Boolean);
}

function footer(f: z.output<typeof factsSchema>): string {
	const how = f.store.phone ? `tell us at the counter or call ${f.store.phone}` : 'tell us at the counter';
	return (
		`You receive this because you asked ${f.store.name} for e-mail about your vehicle. ` +
		`To stop these messages, ${how}.`
	);
}

function vehicleOf(f: z.output<typeof factsSchema>): string {
	const bits = [f.job.vehicle, f.job.plate && `plate ${f.job.plate}`].filter(Boolean);
	return bits.length ? ` (${bits.join(', ')})` : '';
}

function letterFor(kind: NoticeKind, f: z.output<typeof factsSchema>): Letter {
	const store = f.store.name;
	const job = `job ${f.job.number}`;
	const done = when(f.job.doneAt, f.store.timezone);
	const greeting = `Hello ${f.customer.name || 'there'},`;
	if (kind === 'ready') {
		const body: Section[] = [
			{
				lines: [
					`Your vehicle${vehicleOf(f)} is ready for pickup at ${store}.`,
					`Job number: ${f.job.number}${done ? `, finished ${done}` : ''}. Please give this number at the counter.`
				]
			}
		];
		if (f.retorqueAfterDays > 0) {
			body.push({
				lines: [
					`${RETORQUE_PRACTICE} We will remind you in ${f.retorqueAfterDays} day${f.retorqueAfterDays === 1 ? '' : 's'}.`
				]
			});
		}
		return { subject: `Your vehicle is ready for pickup (${job}, ${store})`, greeting, body };
	}
	if (kind === 'retorque') {
		return {
			subject: `Reminder: have your wheel nuts re-torqued (${job}, ${store})`,
			greeting,
			body: [
				{
					lines: [
						`${done ? `On ${done}` : 'Recently'} we worked on the wheels of your vehicle${vehicleOf(f)} (${job}).`,
						RETORQUE_PRACTICE,
						`Once you have driven that far, please come by ${store} and we will re-check the torque with a ` +
							'calibrated torque wrench.',
						'If you notice a vibration or a knocking noise from a wheel before then, slow down, stop where it is safe ' +
							'and call us.'
					]
				}
			]
		};
	}
	const units = f.units;
	return {
		subject: `Service summary (${job}, ${store})`,
		greeting,
		body: [
			{
				lines: [
					`Here is the record of the work on your vehicle${vehicleOf(f)}, ${job}${done ? `, finished ${done}` : ''}.`,
					...(f.job.services.length ? [`Services: ${f.job.services.join(', ')}.`] : [])
				]
			}
		],
		wheels: f.wheels.map((w) => ({
			position: `${w.position} (${positions[w.position] ?? w.position})`,
			values: [
				['Tread depth', measured(w.treadDepthMm, 'tread', units)],
				['Tire age', tireAge(w.dotCode, f.job.doneAt)],
				['Pressure set (cold)', measured(w.pressureSetKpa, 'pressure', units)],
				['Torque applied', measured(w.torqueAppliedNm, 'torque', units)],
				['Damage and repairs', damageOf(w, units)]
			]
		})),
		after: [
			{
				lines: [
					'Tire age is counted from the week of manufacture in the DOT code on the sidewall; how old is too old is ' +
						'a matter of policy, and we are glad to advise.',
					RETORQUE_PRACTICE
				]
			}
		]
	};
}

function asText(letter: Letter, f: z.output<typeof factsSchema>): string {
	const out: string[] = [letter.greeting, ''];
	const sections = (list: Section[] = []) => {
		for (const s of list) {
			if (s.heading) out.push(s.heading);
			out.push(...s.lines, '');
		}
	};
	sections(letter.body);
	for (const w of letter.wheels ?? []) {
		out.push(w.position);
		for (const [label, value] of w.values) out.push(`  ${label}: ${value}`);
		out.push('');
	}
	if (letter.wheels && letter.wheels.length === 0) out.push('No wheel records were kept for this job.', '');
	sections(letter.after);
	out.push(...contact(f), '', '--', footer(f), '');
	return out.join('\n');
}

function asHtml(letter: Letter, f: z.output<typeof factsSchema>): string {
	const e = escapeHtml;
	const p = (text: string) => `<p style="margin:0 0 12px">${e(text)}</p>`;
	const sections = (list: Section[] = []) =>
		list.map((s) => (s.heading ? `<h2 style="font-size:16px">${e(s.heading)}</h2>` : '') + s.lines.map(p).join(''));
	const parts = [p(letter.greeting), ...sections(letter.body)];
	if (letter.wheels) {
		if (letter.wheels.length === 0) parts.push(p('No wheel records were kept for this job.'));
		for (const w of letter.wheels) {
			const rows = w.values
				.map(
					([label, value]) =>
						`<tr><th scope="row" style="text-align:left;vertical-align:top;width:11em;padding:2px 12px 2px 0;font-weight:normal;color:#555">${e(label)}</th><td style="padding:2px 0">${e(value)}</td></tr>`
				)
				.join('');
			parts.push(
				`<table style="border-collapse:collapse;margin:0 0 12px"><caption style="text-align:left;font-weight:bold;padding:4px 0">${e(w.position)}</caption>${rows}</table>`
			);
		}
	}
	parts.push(...sections(letter.after));
	const s = f.store;
	const phone = s.phone ? `<br>Phone <a href="tel:${e(s.phone.replace(/[^+\d]/g, ''))}">${e(s.phone)}</a>` : '';
	const mail = s.email ? `<br>E-mail <a href="mailto:${e(s.email)}">${e(s.email)}</a>` : '';
	const address = s.address ? `<br>${e(s.address)}` : '';
	parts.push(`<p style="margin:16px 0 12px"><strong>${e(s.name)}</strong>${address}${phone}${mail}</p>`);
	parts.push(`<p style="margin:16px 0 0;font-size:12px;color:#666">${e(footer(f))}</p>`);
	return (
		'<!doctype html>\n<html lang="en"><head><meta charset="utf-8">' +
		`<meta name="viewport" content="width=device-width"><title>${e(letter.subject)}</title></head>` +
		`<body style="font-family:system-ui,-apple-system,'Segoe UI',sans-serif;font-size:15px;line-height:1.4;color:#111;max-width:640px;margin:0 auto;padding:16px">` +
		parts.join('\n') +
		'</body></html>\n'
	);
}

/** The notice as it is sent: subject (one line), plain text and HTML. Throws a ZodError on a malformed payload. */
export function render(kind: NoticeKind, payload: unknown): RenderedNotice {
	const facts = factsSchema.parse(payload);
	const letter = letterFor(kind, facts);
	return { subject: oneLine(letter.subject, 250), text: asText(letter, facts), html: asHtml(letter, facts) };
}

// The outbox: customer notices written in the same transaction as the change that causes them, sent later by the
// sender loop (sender.ts). A rollback writes no notice; a committed change always has its notice waiting. Each row
// keeps the facts to render (notices.ts), who it goes to, when it is due, how many attempts it took and the last
// error. Every write here is also an audit row.
import type { Knex } from 'knex';
import type { StoreUnits } from '$lib/schemas/floor';
import { NotAllowedNow, NotFound } from '../errors';
import type { Actor } from '../db/actor';
import * as audit from '../db/audit';
import { inTransaction } from '../db/transaction';
import { db } from '../db';
import { render, type NoticeFacts, type NoticeKind, type RenderedNotice, type WheelFacts } from './notices';
import { recipientSchema, type Recipient } from './transport';

type Query = Knex | Knex.Transaction;

interface JobRow {
	id: number;
	number: number;
	state: string;
	done_at: Date | null;
	customer_name: string;
	customer_email: string;
	notify_email: boolean;
	store_name: string;
	store_phone: string;
	store_email: string;
	store_address: string;
	timezone: string;
	units: StoreUnits;
	notices_enabled: boolean;
	retorque_after_days: number;
	vehicle: string | null;
	plate: string;
	services: string[];
}

async function jobRow(q: Query, storeId: number, jobId: number): Promise<JobRow | undefined> {
	const { rows } = await q.raw(
		`SELECT j.id, j.number, j.state, j.done_at,
		        c.name AS customer_name, c.email AS customer_email, c.notify_email,
		        s.name AS store_name, s.phone AS store_phone, s.email AS store_email, s.address AS store_address,
		        s.timezone, s.units, s.notices_enabled, s.retorque_after_days,
		        CASE WHEN v.id IS NULL THEN NULL ELSE concat_ws(' ', v.make, v.model, nullif(v.trim, '')) END AS vehicle,
		        coalesce(cv.plate, '') AS plate,
		        coalesce((SELECT array_agg(sv.name ORDER BY sv.position, sv.code) FROM job_services js
		                  JOIN services sv ON sv.id = js.service_id WHERE js.job_id = j.id), '{}') AS services
		   FROM jobs j
		   JOIN customers c ON c.id = j.customer_id
		   JOIN stores s ON s.id = j.store_id
		   LEFT JOIN vehicles v ON v.id = j.vehicle_id
		   LEFT JOIN customer_vehicles cv ON cv.id = j.customer_vehicle_id
		  WHERE j.id = ? AND j.store_id = ?`,
		[jobId, storeId]
	);
	return rows[0];
}

function baseFacts(row: JobRow): NoticeFacts {
	return {
		store: {
			name: row.store_name,
			phone: row.store_phone,
			email: row.store_email,
			address: row.store_address,
			timezone: row.timezone
		},
		job: {
			number: row.number,
			doneAt: row.done_at ? new Date(row.done_at).toISOString() : null,
			vehicle: row.vehicle,
			plate: row.plate,
			services: row.services
		},
		customer: { name: row.customer_name }
	};
}

async function write(
	trx: Knex.Transaction,
	actor: Actor,
	row: JobRow,
	kind: NoticeKind,
	to: Recipient,
	facts: NoticeFacts,
	sendAfter: Knex.Raw | Date
): Promise<number> {
	// Render once now: a notice that cannot be rendered is a bug to meet here, not in the sender hours later.
	render(kind, facts);
	const [{ id }] = await trx('outbox')
		.insert({
			store_id: actor.storeId,
			kind,
			job_id: row.id,
			to_name: to.name,
			to_address: to.address,
			payload: JSON.stringify(facts),
			send_after: sendAfter
		})
		.returning('id');
	await audit.record(trx, actor, 'notice', 'outbox', Number(id), { kind, job: row.number });
	return Number(id);
}

/**
 * Called by wheels.ts in the transaction that finishes a job's last wheel: the *ready for pickup* notice, due now,
 * and the *re-torque reminder*, due after the store's interval, for a customer who asked for e-mail and has an
 * address. Once per job: a job reopened and finished again has already told its customer. The caller holds the
 * job's row lock, so two finishes cannot both write. Returns the new outbox ids.
 */
export async function jobFinished(trx: Knex.Transaction, actor: Actor, jobId: number): Promise<number[]> {
	const row = await jobRow(trx, actor.storeId, jobId);
	if (!row || row.state !== 'done' || !row.notices_enabled || !row.notify_email || !row.customer_email) return [];
	const to = recipientSchema.safeParse({ name: row.customer_name, address: row.customer_email });
	if (!to.success) return [];
	const earlier = await trx('outbox').where({ job_id: jobId }).whereIn('kind', ['ready', 'retorque']).first('id');
	if (earlier) return [];

	const days = Number(row.retorque_after_days);
	const facts = baseFacts(row);
	const ids = [await write(trx, actor, row, 'ready', to.data, { ...facts, retorqueAfterDays: days }, trx.raw('now()'))];
	if (days > 0) {
		ids.push(
			await write(trx, actor, row, 'retorque', to.data, facts, trx.raw('now() + make_interval(days => ?)', [days]))
		);
	}
	return ids;
}

const POSITION_ORDER = ['LF', 'RF', 'LR', 'RR', 'SP'];

async function wheelFacts(q: Query, jobId: number): Promise<WheelFacts[]> {
	const rows = await q('wheels as w')
		.leftJoin('wheel_records as r', 'r.wheel_id', 'w.id')
		.select('w.position', 'r.tread_depth_mm', 'r.dot_code', 'r.pressure_set_kpa', 'r.torque_applied_nm', 'r.damage')
		.where('w.job_id', jobId)
		.orderByRaw('array_position(?::text[], w.position), w.id', [POSITION_ORDER]);
	const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
	return rows.map((r) => {
		const damage = (r.damage ?? {}) as Partial<WheelFacts['damage']>;
		return {
			position: r.position,
			treadDepthMm: num(r.tread_depth_mm),
			dotCode: r.dot_code ?? null,
			pressureSetKpa: num(r.pressure_set_kpa),
			torqueAppliedNm: num(r.torque_applied_nm),
			damage: {
				tire: damage.tire ?? [],
				rim: damage.rim ?? [],
				...(damage.puncture
					? { puncture: { location: damage.puncture.location, diameterMm: Number(damage.puncture.diameterMm) } }
					: {})
			}
		};
	});
}

export interface QueuedNotice {
	id: number;
	kind: NoticeKind;
	jobNumber: number;
	to: Recipient;
}

/**
 * A *service summary* asked for at the counter: the job's wheel records in the store's units, to the customer's
 * address (asking for it is consent for this one message, so `notify_email` is not required). Refused while the
 * job's work is unfinished, without an address, or while an earlier summary of the job still waits to be sent.
 */
export async function requestSummary(actor: Actor, jobId: number): Promise<QueuedNotice> {
	return inTransaction(async (trx) => {
		// The job's row lock keeps two quick requests from queueing two summaries.
		const locked = await trx('jobs').select('id').where({ id: jobId, store_id: actor.storeId }).forUpdate().first();
		const row = locked ? await jobRow(trx, actor.storeId, jobId) : undefined;
		if (!row) throw new NotFound('No such job in your store.');
		if (row.state !== 'done' && row.state !== 'collected') {
			throw new NotAllowedNow(
				`Job ${row.number} is ${row.state.replace('_', ' ')}: a summary can be sent once its work is done.`,
				'job_not_done'
			);
		}
		if (!row.customer_email) {
			throw new NotAllowedNow(
				`The customer of job ${row.number} has no e-mail address: add one to the customer first.`,
				'no_email'
			);
		}
		const to = recipientSchema.safeParse({ name: row.customer_name, address: row.customer_email });
		if (!to.success) {
			throw new NotAllowedNow(
				`The customer's e-mail address "${row.customer_email}" cannot be used: ${to.error.issues[0].message}.`,
				'bad_email'
			);
		}
		const waiting = await trx('outbox')
			.where({ job_id: jobId, kind: 'summary' })
			.whereNull('sent_at')
			.where('send_after', '<', trx.raw("'infinity'::timestamptz"))
			.first('id');
		if (waiting) {
			throw new NotAllowedNow(
				`A summary of job ${row.number} is already waiting to be sent (outbox ${waiting.id}).`,
				'summary_waiting'
			);
		}
		const facts: NoticeFacts = { ...baseFacts(row), units: row.units, wheels: await wheelFacts(trx, jobId) };
		const id = await write(trx, actor, row, 'summary', to.data, facts, trx.raw('now()'));
		return { id, kind: 'summary', jobNumber: row.number, to: to.data };
	});
}

// ------------------------------------------------------------------ the manager's view

export interface OutboxEntry {
	id: number;
	kind: NoticeKind;
	jobNumber: number | null;
	to: Recipient;
	createdAt: string;
	/** null: given up (never sent). */
	sendAfter: string | null;
	attempts: number;
	lastError: string | null;
	sentAt: string | null;
	notice: RenderedNotice | null;
	/** Why the notice cannot be shown, when its payload does not render. */
	renderError: string | null;
}

export const PAGE_SIZE = 25;

/** A store's notices, newest first; `before` pages on to older ones. */
export async function list(storeId: number, before?: number): Promise<{ entries: OutboxEntry[]; more: boolean }> {
	const query = db()('outbox as o')
		.leftJoin('jobs as j', 'j.id', 'o.job_id')
		.select(
			'o.id',
			'o.kind',
			'j.number as job_number',
			'o.to_name',
			'o.to_address',
			'o.payload',
			'o.created_at',
			db().raw(`CASE WHEN isfinite(o.send_after) THEN o.send_after END AS send_after`),
			'o.attempts',
			'o.last_error',
			'o.sent_at'
		)
		.where('o.store_id', storeId)
		.orderBy('o.id', 'desc')
		.limit(PAGE_SIZE + 1);
	if (before !== undefined) query.where('o.id', '<', before);
	const rows = await query;
	const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
	const entries = rows.slice(0, PAGE_SIZE).map((r): OutboxEntry => {
		let notice: RenderedNotice | null = null;
		let renderError: string | null = null;
		try {
			notice = render(r.kind, r.payload);
		} catch (e) {
			renderError = e instanceof Error ? e.message : String(e);
		}
		return {
			id: Number(r.id),
			kind: r.kind,
			jobNumber: r.job_number ?? null,
			to: { name: r.to_name, address: r.to_address },
			createdAt: iso(r.created_at)!,
			sendAfter: iso(r.send_after),
			attempts: r.attempts,
			lastError: r.last_error,
			sentAt: iso(r.sent_at),
			notice,
			renderError
		};
	});
	return { entries, more: rows.length > PAGE_SIZE };
}

export interface NoticeSettings {
	noticesEnabled: boolean;
	retorqueAfterDays: number;
}

/** The store's notice settings (migration 20261202000700_notice-settings). */
export async function settings(storeId: number): Promise<NoticeSettings | undefined> {
	const row = await db()('stores').select('notices_enabled', 'retorque_after_days').where({ id: storeId }).first();
	return row && { noticesEnabled: row.notices_enabled, retorqueAfterDays: Number(row.retorque_after_days) };
}

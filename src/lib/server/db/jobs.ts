// Jobs: create from the counter, read, edit, cancel and hand back. Each write is one transaction with its event.
import type { Knex } from 'knex';
import type { CreateJob, JobDetail, PatchJob, WheelPosition } from '$lib/schemas/floor';
import { NotAllowedNow, NotFound, VersionConflict } from '../errors';
import * as events from '../live/events';
import type { Actor } from './actor';
import * as audit from './audit';
import { inTransaction, Retry } from './transaction';
import { db } from './index';
import { jobDetail, jobViews, wheelViews } from './views';
import { removeFromBays } from './queues';

const DEFAULT_WHEELS: WheelPosition[] = ['LF', 'RF', 'LR', 'RR'];

export async function read(actor: Actor, id: number): Promise<JobDetail> {
	const job = await db()('jobs').select('store_id').where({ id }).first();
	// Another store's job is "not found": its existence is not this user's business.
	if (!job || job.store_id !== actor.storeId) throw new NotFound('No such job in your store.');
	return (await jobDetail(db(), id))!;
}

async function customerFor(trx: Knex.Transaction, actor: Actor, input: CreateJob): Promise<number> {
	if (input.customerId !== undefined) {
		const c = await trx('customers').select('id').where({ id: input.customerId, store_id: actor.storeId }).first();
		if (!c) throw new NotFound('No such customer in your store.');
		return c.id;
	}
	const c = input.customer!;
	const [row] = await trx('customers')
		.insert({ store_id: actor.storeId, name: c.name, phone: c.phone, email: c.email, notify_email: c.notifyEmail })
		.returning('id');
	return row.id;
}

async function vehicleFor(trx: Knex.Transaction, customerId: number, input: CreateJob) {
	if (input.vehicleId !== undefined) {
		const v = await trx('vehicles').select('id').where({ id: input.vehicleId }).first();
		if (!v) throw new NotFound('No such vehicle record.');
	}
	if (input.customerVehicleId !== undefined) {
		const cv = await trx('customer_vehicles')
			.select('id', 'vehicle_id')
			.where({ id: input.customerVehicleId, customer_id: customerId })
			.first();
		if (!cv) throw new NotFound('That vehicle does not belong to this customer.');
		return { customerVehicleId: cv.id as number, vehicleId: (input.vehicleId ?? cv.vehicle_id) as number | null };
	}
	if (input.vehicleId !== undefined || input.plate) {
		const [cv] = await trx('customer_vehicles')
			.insert({ customer_id: customerId, vehicle_id: input.vehicleId ?? null, plate: input.plate ?? '' })
			.returning('id');
		return { customerVehicleId: cv.id as number, vehicleId: input.vehicleId ?? null };
	}
	return { customerVehicleId: null, vehicleId: null };
}

export async function create(actor: Actor, input: CreateJob): Promise<JobDetail> {
	return inTransaction(async (trx) => {
		const customerId = await customerFor(trx, actor, input);
		const { customerVehicleId, vehicleId } = await vehicleFor(trx, customerId, input);
		const services: { id: number; code: string }[] = input.services.length
			? await trx('services')
					.select('id', 'code')
					.where({ store_id: actor.storeId, active: true })
					.whereIn('code', input.services)
			: [];
		const unknown = input.services.filter((code) => !services.some((s) => s.code === code));
		if (unknown.length)
			throw new NotAllowedNow(`Unknown or retired service code: ${unknown.join(', ')}.`, 'unknown_service');

		// The store's counter hands out numbers a writer can say aloud; its row lock keeps them unique and gap-free.
		const counter = await trx('stores')
			.where({ id: actor.storeId })
			.increment('next_job_number', 1)
			.returning('next_job_number');
		const number = counter[0].next_job_number - 1;
		const [job] = await trx('jobs')
			.insert({
				store_id: actor.storeId,
				number,
				customer_id: customerId,
				customer_vehicle_id: customerVehicleId,
				vehicle_id: vehicleId,
				kind: input.kind,
				promised_at: new Date(input.promisedAt),
				priority: input.priority,
				notes: input.notes,
				created_by: actor.userId
			})
			.returning('id');
		if (services.length) await trx('job_services').insert(services.map((s) => ({ job_id: job.id, service_id: s.id })));
		const positions = input.wheels ?? DEFAULT_WHEELS;
		const wheelRows: { id: number }[] = await trx('wheels')
			.insert(positions.map((position) => ({ job_id: job.id, position })))
			.returning('id');
		await audit.record(trx, actor, 'create', 'job', job.id, { number });
		const detail = (await jobDetail(trx, job.id))!;
		await events.append(trx, {
			storeId: actor.storeId,
			type: 'job.created',
			entity: 'job',
			entityId: job.id,
			jobs: await jobViews(trx, [job.id]),
			wheels: await wheelViews(
				trx,
				wheelRows.map((w) => w.id)
			)
		});
		return detail;
	});
}

export async function update(actor: Actor, id: number, patch: PatchJob): Promise<JobDetail> {
	return inTransaction(async (trx) => {
		const peek = await trx('jobs').select('store_id').where({ id }).first();
		if (!peek || peek.store_id !== actor.storeId) throw new NotFound('No such job in your store.');
		// Lock order everywhere: bays, then jobs, then wheels (see queues.ts).
		const bayIds: number[] = (await trx('wheels').distinct('bay_id').where({ job_id: id }).whereNotNull('bay_id')).map(
			(r: { bay_id: number }) => r.bay_id
		);
		if (patch.state === 'cancelled' && bayIds.length) {
			await trx('bays').select('id').whereIn('id', bayIds).orderBy('id').forUpdate();
		}
		const job = await trx('jobs').select('*').where({ id }).forUpdate().first();
		if (patch.state === 'cancelled') {
			// A wheel moved into another bay between our first look and the locks: lock again from the start.
			const now: number[] = (await trx('wheels').distinct('bay_id').where({ job_id: id }).whereNotNull('bay_id')).map(
				(r: { bay_id: number }) => r.bay_id
			);
			if (now.some((b) => !bayIds.includes(b))) throw new Retry();
		}
		if (job.version !== patch.version) throw new VersionConflict(await jobDetail(trx, id));

		const changes: Record<string, unknown> = {};
		let type = 'job.updated';
		let changedWheels: number[] = [];
		if (patch.state === 'cancelled') {
			if (job.state !== 'waiting') {
				throw new NotAllowedNow(
					`Job ${job.number} is ${job.state.replace('_', ' ')}: only a job whose work has not started can be cancelled.`
				);
			}
			const started = await trx('wheels').where({ job_id: id }).whereNotNull('started_at').first('id');
			if (started) throw new NotAllowedNow(`Work on job ${job.number} has started: it can no longer be cancelled.`);
			changedWheels = await removeFromBays(trx, id);
			changes.state = 'cancelled';
			type = 'job.cancelled';
		} else if (patch.state === 'collected') {
			if (job.state !== 'done')
				throw new NotAllowedNow(`Job ${job.number} is not done yet, so it cannot be handed back.`);
			Object.assign(changes, { state: 'collected', collected_at: trx.fn.now() });
			type = 'job.collected';
		} else if (job.state === 'cancelled' || job.state === 'collected') {
			if (patch.kind !== undefined || patch.promisedAt !== undefined || patch.priority !== undefined) {
				throw new NotAllowedNow(`Job ${job.number} is ${job.state}: only its notes can still change.`);
			}
		}
		if (patch.kind !== undefined) changes.kind = patch.kind;
		if (patch.promisedAt !== undefined) changes.promised_at = new Date(patch.promisedAt);
		if (patch.priority !== undefined) changes.priority = patch.priority;
		if (patch.notes !== undefined) changes.notes = patch.notes;

		await trx('jobs')
			.where({ id })
			.update({ ...changes, version: job.version + 1, updated_at: trx.fn.now() });
		await audit.record(trx, actor, type.replace('job.', ''), 'job', id, {
			fields: Object.keys(changes).filter((k) => k !== 'notes'),
			notesChanged: 'notes' in changes
		});
		await events.append(trx, {
			storeId: actor.storeId,
			type,
			entity: 'job',
			entityId: id,
			jobs: await jobViews(trx, [id]),
			wheels: await wheelViews(trx, changedWheels)
		});
		return (await jobDetail(trx, id))!;
	});
}

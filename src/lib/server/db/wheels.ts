// A wheel's own changes: start, finish, stop (back to queued) and reopen, with who may do each (DESIGN.md §2):
// a technician starts and finishes wheels in their own bay, a lead or manager does anything, a writer none of it.
// Moves between bays and places live in queues.ts.
import type { Knex } from 'knex';
import type { JobState, PatchWheel, WheelState, WheelView } from '$lib/schemas/floor';
import { Forbidden, NotAllowedNow, NotFound, VersionConflict } from '../errors';
import * as events from '../live/events';
import * as outbox from '../mail/outbox';
import { leads, type Actor } from './actor';
import * as audit from './audit';
import { lockBays, move, renumber, type BayRow } from './queues';
import { inTransaction } from './transaction';
import { jobViews, wheelViews } from './views';
import { db } from './index';

export async function read(actor: Actor, id: number): Promise<WheelView> {
	const row = await db()('wheels as w')
		.join('jobs as j', 'j.id', 'w.job_id')
		.select('j.store_id')
		.where('w.id', id)
		.first();
	if (!row || row.store_id !== actor.storeId) throw new NotFound('No such wheel in your store.');
	return (await wheelViews(db(), [id]))[0];
}

export async function patch(
	actor: Actor,
	id: number,
	change: PatchWheel
): Promise<{ wheels: WheelView[]; eventId: number }> {
	if (change.state === undefined) {
		if (!leads(actor)) throw new Forbidden('Only a lead or a manager moves wheels between bays.');
		let bayId = change.bayId;
		if (bayId === undefined) bayId = (await read(actor, id)).bayId; // a new place in the same bay
		if (bayId === null && change.queuePosition !== undefined) {
			throw new NotAllowedNow('This wheel is in the waiting line, which has no places: move it into a bay.');
		}
		return move(actor, { wheels: [{ id, version: change.version }], bayId, queuePosition: change.queuePosition });
	}
	return setState(actor, id, change.version, change.state);
}

type Transition = 'start' | 'finish' | 'stop' | 'reopen';

function transition(from: WheelState, to: WheelState): Transition {
	if (from === 'queued' && to === 'working') return 'start';
	if (from === 'working' && to === 'done') return 'finish';
	if (from === 'working' && to === 'queued') return 'stop';
	if (from === 'done' && to === 'queued') return 'reopen';
	if (from === to) throw new NotAllowedNow(`This wheel is already ${from}.`);
	if (to === 'done') throw new NotAllowedNow('Start the wheel before finishing it.');
	throw new NotAllowedNow('A done wheel must be reopened before it is started again.');
}

function mayDo(actor: Actor, what: Transition, bay: BayRow | undefined, wheelTech: number | null) {
	if (leads(actor)) return;
	if (actor.role !== 'tech') throw new Forbidden('Only technicians, leads and managers start or finish wheels.');
	if (what === 'reopen') throw new Forbidden('Ask a lead to reopen a finished wheel.');
	if (what === 'start' && bay && bay.tech_id !== null && bay.tech_id !== actor.userId) {
		throw new Forbidden(`Bay ${bay.code} is another technician's bay.`);
	}
	if ((what === 'finish' || what === 'stop') && wheelTech !== actor.userId && bay?.tech_id !== actor.userId) {
		throw new Forbidden('Only the technician on this wheel or on its bay can finish or stop it.');
	}
}

async function setState(
	actor: Actor,
	id: number,
	version: number,
	to: WheelState
): Promise<{ wheels: WheelView[]; eventId: number }> {
	return inTransaction(async (trx) => {
		const peek = await trx('wheels as w')
			.join('jobs as j', 'j.id', 'w.job_id')
			.select('w.bay_id', 'w.job_id', 'j.store_id')
			.where('w.id', id)
			.first();
		if (!peek || peek.store_id !== actor.storeId) throw new NotFound('No such wheel in your store.');
		const bays = await lockBays(trx, actor.storeId, peek.bay_id === null ? [] : [peek.bay_id]);
		const job = await trx('jobs').select('id', 'number', 'state').where({ id: peek.job_id }).forUpdate().first();
		const wheel = await trx('wheels').select('*').where({ id }).forUpdate().first();
		if (wheel.version !== version) throw new VersionConflict({ wheels: await wheelViews(trx, [id]) });
		if (job.state === 'cancelled' || job.state === 'collected') {
			throw new NotAllowedNow(`Job ${job.number} is ${job.state}: its wheels can no longer change.`);
		}
		const what = transition(wheel.state, to);
		const bay = wheel.bay_id === null ? undefined : bays.get(wheel.bay_id);
		mayDo(actor, what, bay, wheel.tech_id);

		const now = trx.fn.now();
		const base = { version: wheel.version + 1, updated_at: now };
		const changed = new Set<number>([id]);
		if (what === 'start') {
			if (!bay) throw new NotAllowedNow('Put the wheel in a bay before starting it.');
			if (!bay.active) throw new NotAllowedNow(`Bay ${bay.code} is out of service.`);
			const tech = actor.role === 'tech' ? actor.userId : (bay.tech_id ?? actor.userId);
			await trx('wheels')
				.where({ id })
				.update({ ...base, state: 'working', started_at: now, finished_at: null, tech_id: tech });
		} else if (what === 'finish') {
			await trx('wheels')
				.where({ id })
				.update({ ...base, state: 'done', finished_at: now, queue_position: null });
		} else if (what === 'stop') {
			await trx('wheels')
				.where({ id })
				.update({ ...base, state: 'queued', started_at: null, tech_id: null });
		} else {
			// Reopened work goes to the end of its bay's queue, or back to the waiting line if the bay is out of service.
			const back = bay?.active ? bay.id : null;
			await trx('wheels')
				.where({ id })
				.update({
					...base,
					state: 'queued',
					started_at: null,
					finished_at: null,
					tech_id: null,
					bay_id: back,
					queue_position: back === null ? null : 100_000
				});
		}
		if (wheel.bay_id !== null) for (const w of await renumber(trx, wheel.bay_id)) changed.add(w);

		const jobChanged = await settleJob(trx, job.id, job.state);
		// The job's last wheel is done: its customer notices are written in this transaction, so they exist exactly
		// when the finish commits (src/lib/server/mail/outbox.ts).
		if (what === 'finish' && jobChanged) await outbox.jobFinished(trx, actor, job.id);
		await audit.record(trx, actor, what, 'wheel', id, { job: job.number, bay: bay?.code ?? null });
		const views = await wheelViews(trx, [...changed]);
		const eventId = await events.append(trx, {
			storeId: actor.storeId,
			type: `wheel.${what === 'start' ? 'started' : what === 'finish' ? 'finished' : what === 'stop' ? 'stopped' : 'reopened'}`,
			entity: 'wheel',
			entityId: id,
			wheels: views,
			jobs: jobChanged ? await jobViews(trx, [job.id]) : [],
			bays: []
		});
		return { wheels: views, eventId };
	});
}

/** A job's state follows its wheels: all done → done, any started → in progress, none → waiting. */
async function settleJob(trx: Knex.Transaction, jobId: number, current: JobState): Promise<boolean> {
	const counts: { state: WheelState; n: number }[] = await trx('wheels')
		.select('state')
		.count({ n: '*' })
		.where({ job_id: jobId })
		.groupBy('state');
	const n = (s: WheelState) => Number(counts.find((c) => c.state === s)?.n ?? 0);
	const total = n('queued') + n('working') + n('done');
	const next: JobState =
		total > 0 && n('done') === total ? 'done' : n('working') + n('done') > 0 ? 'in_progress' : 'waiting';
	if (next === current) return false;
	await trx('jobs')
		.where({ id: jobId })
		.update({
			state: next,
			started_at: trx.raw('coalesce(started_at, now())'),
			done_at: next === 'done' ? trx.fn.now() : null,
			updated_at: trx.fn.now()
		});
	return true;
}

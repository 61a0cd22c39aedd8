// fast-check over the real database: random sequences of moves, starts, stops, finishes and reopens across bays
// keep every bay's queue places unique and gap-free and each wheel in at most one bay, and replaying the events
// from the start rebuilds exactly the floor the database holds.
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { close } from '$lib/server/db';
import type { Actor } from '$lib/server/db/actor';
import * as jobs from '$lib/server/db/jobs';
import * as queues from '$lib/server/db/queues';
import * as wheels from '$lib/server/db/wheels';
import { NotAllowedNow } from '$lib/server/errors';
import type { WheelView } from '$lib/schemas/floor';
import { withClient } from '../support/database';
import { createTestStore, type TestStore } from '../support/store';

let store: TestStore;
let lead: Actor;

beforeAll(async () => {
	store = await createTestStore(`queues-${process.pid}`, 3);
	lead = { userId: store.people.lead.id, storeId: store.id, role: 'lead' };
});
afterAll(async () => {
	await close();
});

type Op =
	| { kind: 'move'; wheel: number; bay: number; place: number | null }
	| { kind: 'moveJob'; job: number; bay: number }
	| { kind: 'state'; wheel: number; to: 'working' | 'done' | 'queued' };

const op: fc.Arbitrary<Op> = fc.oneof(
	fc.record({
		kind: fc.constant('move' as const),
		wheel: fc.nat(11),
		bay: fc.nat(3),
		place: fc.option(fc.integer({ min: 1, max: 8 }))
	}),
	fc.record({ kind: fc.constant('moveJob' as const), job: fc.nat(2), bay: fc.nat(3) }),
	fc.record({
		kind: fc.constant('state' as const),
		wheel: fc.nat(11),
		to: fc.constantFrom('working' as const, 'done' as const, 'queued' as const)
	})
);

async function storeWheels(): Promise<WheelView[]> {
	return withClient(async (c) => {
		const { rows } = await c.query(
			`SELECT w.id, w.bay_id, w.queue_position, w.state, w.version FROM wheels w JOIN jobs j ON j.id = w.job_id
			  WHERE j.store_id = $1 ORDER BY w.id`,
			[store.id]
		);
		return rows.map(
			(r) =>
				({
					id: r.id,
					bayId: r.bay_id,
					queuePosition: r.queue_position,
					state: r.state,
					version: r.version
				}) as WheelView
		);
	});
}

async function replayed(): Promise<Map<number, WheelView>> {
	const floor = new Map<number, WheelView>();
	await withClient(async (c) => {
		const { rows } = await c.query('SELECT payload FROM events WHERE store_id = $1 ORDER BY id', [store.id]);
		for (const { payload } of rows) for (const w of payload.wheels as WheelView[]) floor.set(w.id, w);
	});
	return floor;
}

/** Expected refusals (a finished wheel cannot be moved, and so on) are part of the game; anything else is a bug. */
let applied = 0;
let refused = 0;
async function attempt(work: () => Promise<unknown>) {
	try {
		await work();
		applied++;
	} catch (error) {
		if (!(error instanceof NotAllowedNow)) throw error;
		refused++;
	}
}

describe('bay queues under random operations', () => {
	it('stay unique and gap-free, hold each wheel once, and replay to the same floor', { timeout: 120_000 }, async () => {
		await fc.assert(
			fc.asyncProperty(fc.array(op, { minLength: 1, maxLength: 25 }), async (ops) => {
				const made = await Promise.all(
					[4, 4, 2].map((n) =>
						jobs.create(lead, {
							customer: { name: 'Invented Property Customer', phone: '', email: '', notifyEmail: false },
							kind: 'waiter',
							promisedAt: new Date().toISOString(),
							services: [],
							priority: 0,
							notes: '',
							wheels: (['LF', 'RF', 'LR', 'RR'] as const).slice(0, n)
						})
					)
				);
				const wheelIds = made.flatMap((j) => j.wheels.map((w) => w.id));
				const bayOf = (i: number) => (i === store.bays.length ? null : store.bays[i].id);
				const current = async () => new Map((await storeWheels()).map((w) => [w.id, w]));
				for (const o of ops) {
					const now = await current();
					if (o.kind === 'move') {
						const w = now.get(wheelIds[o.wheel % wheelIds.length])!;
						await attempt(() =>
							wheels.patch(lead, w.id, {
								version: w.version,
								bayId: bayOf(o.bay),
								...(o.place && bayOf(o.bay) !== null ? { queuePosition: o.place } : {})
							})
						);
					} else if (o.kind === 'moveJob') {
						const job = made[o.job];
						await attempt(() =>
							queues.move(lead, {
								wheels: job.wheels.map((w) => ({ id: w.id, version: now.get(w.id)!.version })),
								bayId: bayOf(o.bay)
							})
						);
					} else {
						const w = now.get(wheelIds[o.wheel % wheelIds.length])!;
						await attempt(() => wheels.patch(lead, w.id, { version: w.version, state: o.to }));
					}
				}
				const all = await storeWheels();
				for (const bay of store.bays) {
					const live = all.filter((w) => w.bayId === bay.id && w.state !== 'done');
					const places = live.map((w) => w.queuePosition).sort((a, b) => a! - b!);
					expect(places, `bay ${bay.code} places`).toEqual(live.map((_, i) => i + 1));
					const working = live.filter((w) => w.state === 'working').map((w) => w.queuePosition!);
					const queued = live.filter((w) => w.state === 'queued').map((w) => w.queuePosition!);
					if (working.length && queued.length) expect(Math.max(...working)).toBeLessThan(Math.min(...queued));
				}
				for (const w of all) {
					if (w.bayId === null || w.state === 'done') expect(w.queuePosition).toBeNull();
					if (w.state === 'working') expect(w.bayId).not.toBeNull();
				}
				const floor = await replayed();
				for (const w of all) expect(floor.get(w.id), `wheel ${w.id} replayed`).toMatchObject(w);
			}),
			{ numRuns: 15 }
		);
		// The property means little if nearly every operation was refused.
		expect(applied, `${applied} applied, ${refused} refused`).toBeGreaterThan(refused / 2);
	});
});

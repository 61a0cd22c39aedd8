import { describe, expect, it } from 'vitest';
import { fc } from '@fast-check/vitest';
import type { FloorEvent, WheelState, WheelView } from '$lib/schemas/floor';
import {
	applyEvent,
	applyEvents,
	applyRows,
	confirm,
	countersOf,
	fromSnapshot,
	lanesOf,
	pendingWheels,
	predict,
	propose,
	rollback,
	settle,
	targetsOf,
	waitingLine,
	withPending,
	type Floor,
	type Pending,
	type WheelChange
} from './floor-model';
import { bay, event, job, NOON, snapshotOf, wheel } from './test-fixtures';

/**
 * Bay 1: 11 (working), 12, 21, 22.   Bay 2: 41.   Bay 3: out of service, empty.
 * Waiting: job 3 (31, 32, promised 12:00) and job 5 (51, promised 10:00).
 */
function standardRows() {
	return {
		bays: [bay(1), bay(2), bay(3, { active: false })],
		jobs: [
			job(1, { state: 'in_progress' }),
			job(2),
			job(3),
			job(4),
			job(5, { promisedAt: '2026-03-02T10:00:00.000Z' })
		],
		wheels: [
			wheel(11, 1, { bayId: 1, queuePosition: 1, state: 'working', startedAt: '2026-03-02T11:40:00.000Z' }),
			wheel(12, 1, { bayId: 1, queuePosition: 2 }),
			wheel(21, 2, { bayId: 1, queuePosition: 3 }),
			wheel(22, 2, { bayId: 1, queuePosition: 4 }),
			wheel(31, 3),
			wheel(32, 3),
			wheel(41, 4, { bayId: 2, queuePosition: 1 }),
			wheel(51, 5)
		],
		cursor: 10
	};
}

const standard = () => fromSnapshot(snapshotOf(standardRows()), NOON);

/** A bay's lane as "id:place" pairs, the way a person would read it off the screen. */
function places(floor: Floor, bayId: number): string {
	const lane = lanesOf(floor).find((l) => l.id === bayId);
	return (lane?.wheels ?? []).map((w) => `${w.id}:${w.queuePosition}`).join(' ');
}

function mustPredict(floor: Floor, change: WheelChange) {
	const p = predict(floor, change);
	if (!p.ok) throw new Error(`refused: ${p.message}`);
	return p;
}

const w = (floor: Floor, id: number) => floor.wheels.get(id)!;

describe('fromSnapshot and the floor lists', () => {
	it('merges the wheels listed under bays and under waiting jobs, and keeps the cursor', () => {
		const floor = standard();
		expect([...floor.wheels.keys()].sort((a, b) => a - b)).toEqual([11, 12, 21, 22, 31, 32, 41, 51]);
		expect(floor.cursor).toBe(10);
		expect(places(floor, 1)).toBe('11:1 12:2 21:3 22:4');
		expect(places(floor, 2)).toBe('41:1');
		expect(places(floor, 3)).toBe('');
	});

	it('lists the waiting line by promised time, each job with all of its wheels', () => {
		const line = waitingLine(standard());
		expect(line.map((j) => j.id)).toEqual([5, 3]);
		expect(line[1].wheels.map((x) => x.id)).toEqual([31, 32]);
	});

	it('keeps cancelled and collected jobs out of the lanes and the waiting line', () => {
		const floor = applyEvent(
			standard(),
			event(11, { jobs: [job(3, { state: 'cancelled', version: 2 }), job(2, { state: 'collected', version: 2 })] })
		);
		expect(waitingLine(floor).map((j) => j.id)).toEqual([5]);
		expect(places(floor, 1)).toBe('11:1 12:2');
		// The rows stay: today's counters still need them.
		expect(floor.jobs.get(3)?.state).toBe('cancelled');
	});
});

describe('applyEvent', () => {
	it('upserts the rows an event carries and advances the cursor', () => {
		const before = standard();
		const after = applyEvent(before, event(11, { wheels: [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 })] }));
		expect(after.cursor).toBe(11);
		expect(places(after, 2)).toBe('41:1 31:2');
		expect(waitingLine(after).map((j) => j.id)).toEqual([5, 3]); // 32 still waits
		// Untouched kinds are not copied: the screen redraws only what changed.
		expect(after.bays).toBe(before.bays);
		expect(after.jobs).toBe(before.jobs);
		// And the floor it came from is not changed.
		expect(places(before, 2)).toBe('41:1');
	});

	it('adds rows it has not seen, such as a new job and its wheels', () => {
		const after = applyEvent(standard(), event(11, { jobs: [job(6)], wheels: [wheel(61, 6), wheel(62, 6)] }));
		expect(waitingLine(after).map((j) => j.id)).toContain(6);
		expect(after.wheels.get(62)?.jobId).toBe(6);
	});

	it('ignores an event it has already applied', () => {
		const e = event(11, { wheels: [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 })] });
		const once = applyEvent(standard(), e);
		expect(applyEvent(once, e)).toBe(once);
	});

	it('ignores events at or below the snapshot cursor (already in the snapshot)', () => {
		const floor = standard();
		const old = event(10, { wheels: [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 })] });
		const older = event(3, { bays: [bay(1, { name: 'Renamed' })] });
		expect(applyEvents(floor, [old, older])).toBe(floor);
	});

	it('ignores a lower id that arrives after a higher one', () => {
		const high = event(13, { wheels: [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 3 })] });
		const low = event(12, { wheels: [wheel(31, 3, { version: 2 })] });
		const floor = applyEvents(standard(), [high, low]);
		expect(floor.cursor).toBe(13);
		expect(w(floor, 31)).toMatchObject({ bayId: 2, queuePosition: 2, version: 3 });
	});

	it('never takes a row back to an older version, but still applies the rest of the event', () => {
		// A 409 answer showed version 3 before the stream got there; the stream then brings version 2 and a neighbour.
		const ahead = applyRows(standard(), { wheels: [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 3 })] });
		const floor = applyEvent(
			ahead,
			event(11, { wheels: [wheel(31, 3, { version: 2 }), wheel(41, 4, { bayId: 2, queuePosition: 1, version: 2 })] })
		);
		expect(w(floor, 31).version).toBe(3);
		expect(w(floor, 41).version).toBe(2);
		expect(floor.cursor).toBe(11);
	});
});

describe('applyRows (an HTTP answer outside the event order)', () => {
	it('takes only strictly newer rows and leaves the cursor where it is', () => {
		const floor = standard();
		const same = applyRows(floor, { wheels: [wheel(31, 3, { bayId: 1, queuePosition: 9, version: 1 })] });
		expect(same).toBe(floor);
		const newer = applyRows(floor, { wheels: [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 })] });
		expect(w(newer, 31)).toMatchObject({ bayId: 2, version: 2 });
		expect(newer.cursor).toBe(10);
	});
});

describe('predict: places stay unique and gap-free, as the server numbers them', () => {
	it('puts a wheel asked to go first behind the wheel being worked on', () => {
		const p = mustPredict(standard(), { kind: 'move', wheelIds: [31], bayId: 1, queuePosition: 1 });
		expect(places(p.floor, 1)).toBe('11:1 31:2 12:3 21:4 22:5');
		expect(p.changed.sort((a, b) => a - b)).toEqual([12, 21, 22, 31]);
	});

	it('closes the gap in the bay a wheel leaves and adds it at the end of the other', () => {
		const p = mustPredict(standard(), { kind: 'move', wheelIds: [12], bayId: 2 });
		expect(places(p.floor, 1)).toBe('11:1 21:2 22:3');
		expect(places(p.floor, 2)).toBe('41:1 12:2');
	});

	it('moves a whole job together, in the order asked', () => {
		const p = mustPredict(standard(), { kind: 'move', wheelIds: [32, 31], bayId: 2, queuePosition: 1 });
		expect(places(p.floor, 2)).toBe('32:1 31:2 41:3');
		expect(waitingLine(p.floor).map((j) => j.id)).toEqual([5]);
	});

	it('reorders within one bay', () => {
		const p = mustPredict(standard(), { kind: 'move', wheelIds: [22], bayId: 1, queuePosition: 2 });
		expect(places(p.floor, 1)).toBe('11:1 22:2 12:3 21:4');
	});

	it('clamps a place past the end to the end', () => {
		const p = mustPredict(standard(), { kind: 'move', wheelIds: [31], bayId: 2, queuePosition: 40 });
		expect(places(p.floor, 2)).toBe('41:1 31:2');
	});

	it('takes a wheel back to the waiting line with no place', () => {
		const p = mustPredict(standard(), { kind: 'move', wheelIds: [21], bayId: null });
		expect(w(p.floor, 21)).toMatchObject({ bayId: null, queuePosition: null });
		expect(places(p.floor, 1)).toBe('11:1 12:2 22:3');
		expect(waitingLine(p.floor).map((j) => j.id)).toEqual([5, 2, 3]);
	});

	it('a finished wheel keeps its bay but loses its place, and the rest move up', () => {
		const p = mustPredict(standard(), { kind: 'state', wheelId: 11, to: 'done', at: NOON.toISOString() });
		expect(w(p.floor, 11)).toMatchObject({
			state: 'done',
			bayId: 1,
			queuePosition: null,
			finishedAt: NOON.toISOString()
		});
		expect(places(p.floor, 1)).toBe('12:1 21:2 22:3');
	});

	it('a started wheel joins the working wheels at the front', () => {
		const p = mustPredict(standard(), { kind: 'state', wheelId: 21, to: 'working', at: NOON.toISOString() });
		expect(places(p.floor, 1)).toBe('11:1 21:2 12:3 22:4');
	});

	it('a stopped wheel goes behind the wheels still being worked on', () => {
		const started = mustPredict(standard(), {
			kind: 'state',
			wheelId: 21,
			to: 'working',
			at: NOON.toISOString()
		}).floor;
		const p = mustPredict(started, { kind: 'state', wheelId: 11, to: 'queued', at: NOON.toISOString() });
		expect(places(p.floor, 1)).toBe('21:1 11:2 12:3 22:4');
		expect(w(p.floor, 11)).toMatchObject({ state: 'queued', startedAt: null });
	});

	it('a reopened wheel goes to the end of its bay, or back to waiting if the bay is out of service', () => {
		const rows = standardRows();
		rows.wheels.push(
			wheel(71, 4, {
				bayId: 2,
				state: 'done',
				startedAt: '2026-03-02T10:00:00.000Z',
				finishedAt: '2026-03-02T10:10:00.000Z'
			}),
			wheel(72, 4, {
				bayId: 3,
				state: 'done',
				startedAt: '2026-03-02T10:00:00.000Z',
				finishedAt: '2026-03-02T10:10:00.000Z'
			}),
			wheel(73, 4) // keeps job 4 in the waiting line, so the snapshot carries its done wheels
		);
		const floor = fromSnapshot(snapshotOf(rows), NOON);
		const back = mustPredict(floor, { kind: 'state', wheelId: 71, to: 'queued', at: NOON.toISOString() });
		expect(places(back.floor, 2)).toBe('41:1 71:2');
		const out = mustPredict(floor, { kind: 'state', wheelId: 72, to: 'queued', at: NOON.toISOString() });
		expect(w(out.floor, 72)).toMatchObject({ bayId: null, queuePosition: null, state: 'queued', finishedAt: null });
	});

	it('refuses what the server would refuse, in words', () => {
		const floor = standard();
		const refused = (change: WheelChange) => {
			const p = predict(floor, change);
			return p.ok ? null : p.message;
		};
		expect(refused({ kind: 'move', wheelIds: [11], bayId: 2 })).toBe(
			'Wheel RF of job 1001 is being worked on: only queued wheels move.'
		);
		expect(refused({ kind: 'move', wheelIds: [31], bayId: 3 })).toBe('Bay B3 is out of service.');
		expect(refused({ kind: 'move', wheelIds: [31], bayId: 99 })).toBe('No such bay in your store.');
		expect(refused({ kind: 'move', wheelIds: [999], bayId: 1 })).toBe('That wheel is no longer on the floor.');
		expect(refused({ kind: 'state', wheelId: 12, to: 'done', at: '' })).toBe('Start the wheel before finishing it.');
		expect(refused({ kind: 'state', wheelId: 31, to: 'working', at: '' })).toBe(
			'Put the wheel in a bay before starting it.'
		);
		const cancelled = applyEvent(floor, event(11, { jobs: [job(3, { state: 'cancelled', version: 2 })] }));
		const p = predict(cancelled, { kind: 'move', wheelIds: [31], bayId: 1 });
		expect(p.ok ? null : p.message).toBe('Job 1003 is cancelled: its wheels stay where they are.');
	});
});

describe('optimistic changes', () => {
	const move31: WheelChange = { kind: 'move', wheelIds: [31], bayId: 2 };

	it('shows a move at once and, rolled back, gives back exactly the floor before it', () => {
		const floor = standard();
		const untouched = structuredClone(floor);
		let pending = propose([], 1, move31);
		expect(places(withPending(floor, pending), 2)).toBe('41:1 31:2');
		expect(pendingWheels(pending)).toEqual(new Set([31]));
		pending = rollback(pending, 1);
		expect(pending).toEqual([]);
		expect(withPending(floor, pending)).toEqual(untouched);
		expect(floor).toEqual(untouched);
	});

	it('keeps what the stream brought while the move was in flight when rolling back', () => {
		let floor = standard();
		let pending: readonly Pending[] = propose([], 1, move31);
		// Meanwhile someone else puts 32 in bay 2.
		floor = applyEvent(floor, event(11, { wheels: [wheel(32, 3, { bayId: 2, queuePosition: 2, version: 2 })] }));
		expect(places(withPending(floor, pending), 2)).toBe('41:1 32:2 31:3');
		pending = rollback(pending, 1);
		expect(places(withPending(floor, pending), 2)).toBe('41:1 32:2');
	});

	it('shows the server’s word when the stream makes a pending move impossible', () => {
		let floor = standard();
		const pending = propose([], 1, move31);
		floor = applyEvent(
			floor,
			event(11, { wheels: [wheel(31, 3, { bayId: 1, queuePosition: 5, state: 'working', version: 2 })] })
		);
		expect(withPending(floor, pending).wheels.get(31)).toMatchObject({ bayId: 1, state: 'working' });
	});

	it('after a 200, shows the answered versions and drops the change once the stream brings it', () => {
		let floor = standard();
		let pending: readonly Pending[] = propose([], 1, move31);
		const answer = [
			wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 }),
			wheel(41, 4, { bayId: 2, queuePosition: 1 })
		];
		pending = settle(floor, confirm(pending, 1, answer));
		expect(pending).toHaveLength(1);
		expect(pendingWheels(pending).size).toBe(0);
		// The next change of 31 must send version 2, before the stream has said so.
		expect(withPending(floor, pending).wheels.get(31)).toMatchObject({ version: 2, bayId: 2, queuePosition: 2 });
		floor = applyEvent(floor, event(11, { wheels: answer }));
		pending = settle(floor, pending);
		expect(pending).toEqual([]);
		expect(withPending(floor, pending)).toBe(floor);
	});

	it('after a 200 that comes after the stream already brought the change, settles at once', () => {
		const answer = [wheel(31, 3, { bayId: 2, queuePosition: 2, version: 2 })];
		const floor = applyEvent(standard(), event(11, { wheels: answer }));
		expect(settle(floor, confirm(propose([], 1, move31), 1, answer))).toEqual([]);
	});

	it('after a 409, the current rows replace the stale ones', () => {
		const floor = standard();
		let pending = propose([], 1, move31);
		pending = rollback(pending, 1);
		const current = [wheel(31, 3, { bayId: 1, queuePosition: 5, version: 4 })];
		const shown = withPending(applyRows(floor, { wheels: current }), pending);
		expect(shown.wheels.get(31)).toMatchObject({ bayId: 1, queuePosition: 5, version: 4 });
	});
});

describe('countersOf', () => {
	const counters = { wheelsDone: 5, wheelsPlanned: 20, minPerWheel: 12 };

	it('gives the snapshot’s figures until something changes', () => {
		const floor = fromSnapshot(snapshotOf({ ...standardRows(), counters }), NOON);
		expect(countersOf(floor, NOON)).toEqual(counters);
	});

	it('counts a wheel finished today and its minutes into the pace', () => {
		const floor = fromSnapshot(snapshotOf({ ...standardRows(), counters }), NOON);
		const finished = applyEvent(
			floor,
			event(11, {
				wheels: [
					wheel(11, 1, {
						bayId: 1,
						state: 'done',
						version: 2,
						startedAt: '2026-03-02T11:40:00.000Z',
						finishedAt: '2026-03-02T12:00:00.000Z'
					})
				]
			})
		);
		// (5 wheels × 12 min + 20 min) / 6 wheels = 13.33…
		expect(countersOf(finished, NOON)).toEqual({ wheelsDone: 6, wheelsPlanned: 20, minPerWheel: 13.3 });
	});

	it('drops a cancelled job’s wheels from the plan', () => {
		const floor = fromSnapshot(snapshotOf({ ...standardRows(), counters }), NOON);
		const cancelled = applyEvent(floor, event(11, { jobs: [job(2, { state: 'cancelled', version: 2 })] }));
		expect(countersOf(cancelled, NOON).wheelsPlanned).toBe(18);
	});

	it('after midnight in the store’s zone, counts from the rows alone', () => {
		const floor = fromSnapshot(snapshotOf({ ...standardRows(), counters }), NOON);
		expect(countersOf(floor, new Date('2026-03-03T06:00:00.000Z'))).toEqual({
			wheelsDone: 0,
			wheelsPlanned: 0,
			minPerWheel: null
		});
	});

	it('reads "today" in the store’s time zone, not UTC', () => {
		// 03:30 UTC on the 3rd is still the evening of the 2nd in New York.
		const lateEvening = new Date('2026-03-03T03:30:00.000Z');
		const floor = fromSnapshot(snapshotOf({ ...standardRows(), counters, timezone: 'America/New_York' }), lateEvening);
		const finished = applyEvent(
			floor,
			event(11, {
				wheels: [
					wheel(11, 1, {
						bayId: 1,
						state: 'done',
						version: 2,
						startedAt: '2026-03-03T03:00:00.000Z',
						finishedAt: '2026-03-03T03:12:00.000Z'
					})
				]
			})
		);
		expect(countersOf(finished, lateEvening).wheelsDone).toBe(6);
	});
});

// ------------------------------------------------------------------ property: a server, a lagging screen, and this screen's own changes

interface Step {
	mine: boolean;
	change: {
		move: boolean;
		picks: number[];
		bay: number;
		toWaiting: boolean;
		place: number | undefined;
		to: WheelState;
	};
	/** How many undelivered events reach the screen after this step. */
	deliver: number;
	/** Re-deliver an old event (a reconnect overlap or a duplicate). */
	replay: number | null;
	/** Answer the oldest request still waiting for its answer. */
	answer: boolean;
}

const stepArb: fc.Arbitrary<Step> = fc.record({
	mine: fc.boolean(),
	change: fc.record({
		move: fc.boolean(),
		picks: fc.array(fc.nat(), { minLength: 1, maxLength: 3 }),
		bay: fc.nat(),
		toWaiting: fc.boolean(),
		place: fc.option(fc.integer({ min: 1, max: 8 }), { nil: undefined }),
		to: fc.constantFrom<WheelState>('queued', 'working', 'done')
	}),
	// Mostly a stream that lags a little behind the answers, sometimes one that catches up in a burst.
	deliver: fc.constantFrom(0, 0, 0, 1, 1, 2, 6),
	replay: fc.option(fc.nat(), { nil: null }),
	answer: fc.boolean()
});

const worldArb = fc.record({
	bays: fc.array(fc.constantFrom(true, true, true, false), { minLength: 1, maxLength: 4 }),
	jobs: fc.array(fc.integer({ min: 1, max: 4 }), { minLength: 1, maxLength: 5 })
});

/** Every bay's queued and working wheels hold the places 1..n; nothing else holds a place. */
function assertStrictPlaces(floor: Floor) {
	const byBay = new Map<number, number[]>();
	for (const x of floor.wheels.values()) {
		if (x.bayId !== null && x.state !== 'done')
			byBay.set(x.bayId, [...(byBay.get(x.bayId) ?? []), x.queuePosition ?? -1]);
		else expect(x.queuePosition).toBeNull();
	}
	for (const list of byBay.values()) expect(list.sort((a, b) => a - b)).toEqual(list.map((_, i) => i + 1));
}

/** What a person sees: each lane numbered 1..n, and each wheel in at most one lane and never also waiting. */
function assertShownFloor(floor: Floor) {
	const seen = new Set<number>();
	for (const lane of lanesOf(floor)) {
		expect(lane.wheels.map((x) => x.queuePosition)).toEqual(lane.wheels.map((_, i) => i + 1));
		for (const x of lane.wheels) {
			expect(seen.has(x.id)).toBe(false);
			seen.add(x.id);
		}
	}
	for (const j of waitingLine(floor))
		for (const x of j.wheels) if (x.bayId === null) expect(seen.has(x.id)).toBe(false);
}

describe('property: any sequence of moves, starts and finishes', () => {
	it('keeps places 1..n per bay and each wheel in one bay; the screen ends equal to the server', () => {
		fc.assert(
			fc.property(worldArb, fc.array(stepArb, { maxLength: 60 }), (world, steps) => {
				const bays = world.bays.map((active, i) => bay(i + 1, { active }));
				const jobs = world.jobs.map((_, i) => job(i + 1));
				const wheels = world.jobs.flatMap((n, i) =>
					Array.from({ length: n }, (_, k) => wheel((i + 1) * 10 + k, i + 1))
				);
				const wheelIds = wheels.map((x) => x.id);
				const snapshot = snapshotOf({ bays, jobs, wheels, cursor: 0 });

				let server = fromSnapshot(snapshot, NOON);
				let screen = fromSnapshot(snapshot, NOON);
				let pending: readonly Pending[] = [];
				const log: FloorEvent[] = [];
				let delivered = 0;
				/** Answers the server has given that have not reached the screen yet, oldest first. */
				const answers: { key: number; status: 200 | 409 | 422; rows: WheelView[] }[] = [];
				/** Set while a 409 answer has put rows on the screen ahead of the stream. */
				let ahead = false;
				let keys = 0;

				const serve = (
					change: WheelChange,
					sent?: Map<number, number>
				): { status: 200 | 409 | 422; rows: WheelView[] } => {
					const targets = targetsOf(change);
					if (sent && targets.some((id) => server.wheels.get(id)!.version !== sent.get(id))) {
						return { status: 409, rows: targets.map((id) => server.wheels.get(id)!) };
					}
					const p = predict(server, change);
					if (!p.ok) return { status: 422, rows: [] };
					const next = new Map(p.floor.wheels);
					for (const id of targets) next.set(id, { ...next.get(id)!, version: next.get(id)!.version + 1 });
					const id = log.length + 1;
					server = { ...p.floor, wheels: next, cursor: id };
					const rows = p.changed.map((x) => next.get(x)!);
					log.push(event(id, { wheels: rows }));
					assertStrictPlaces(server);
					return { status: 200, rows };
				};

				const receive = (e: FloorEvent) => {
					screen = applyEvent(screen, e);
					pending = settle(screen, pending);
					if (screen.cursor === log.length) ahead = false;
				};

				const answerOldest = () => {
					const a = answers.shift();
					if (!a) return;
					if (a.status === 200) pending = settle(screen, confirm(pending, a.key, a.rows));
					else {
						pending = rollback(pending, a.key);
						if (a.status === 409) {
							const next = applyRows(screen, { wheels: a.rows });
							if (next !== screen && screen.cursor < log.length) ahead = true;
							screen = next;
							pending = settle(screen, pending);
						}
					}
				};

				for (const step of steps) {
					const picks = [...new Set(step.change.picks.map((p) => wheelIds[p % wheelIds.length]))];
					const change: WheelChange = step.change.move
						? {
								kind: 'move',
								wheelIds: picks,
								bayId: step.change.toWaiting ? null : (step.change.bay % bays.length) + 1,
								queuePosition: step.change.place
							}
						: { kind: 'state', wheelId: picks[0], to: step.change.to, at: NOON.toISOString() };

					if (!step.mine) serve(change);
					else {
						const shown = withPending(screen, pending);
						if (predict(shown, change).ok) {
							const key = ++keys;
							pending = propose(pending, key, change);
							const sent = new Map(targetsOf(change).map((id) => [id, shown.wheels.get(id)!.version]));
							answers.push({ key, ...serve(change, sent) });
						}
					}
					for (let i = 0; i < step.deliver && delivered < log.length; i++) receive(log[delivered++]);
					if (step.replay !== null && delivered > 0) {
						const before = screen;
						screen = applyEvent(screen, log[step.replay % delivered]);
						expect(screen).toBe(before);
					}
					if (step.answer) answerOldest();
					if (!ahead) assertShownFloor(withPending(screen, pending));
				}

				while (delivered < log.length) receive(log[delivered++]);
				while (answers.length > 0) answerOldest();
				expect(pending).toEqual([]);
				expect(screen.cursor).toBe(log.length);
				expect(screen.wheels).toEqual(server.wheels);
				assertShownFloor(withPending(screen, pending));
				// Replaying the whole log onto the snapshot, twice over, rebuilds the same floor.
				expect(applyEvents(fromSnapshot(snapshot, NOON), [...log, ...log]).wheels).toEqual(server.wheels);
			}),
			{ numRuns: 300 }
		);
	});
});

import { describe, it, expect } from 'vitest';
import { test as fcTest, fc } from '@fast-check/vitest';
import { pace, forecastQueue, suggestPromise, floorCapacity } from './pacing';

const MIN = 60_000;
const T0 = new Date('2025-06-02T09:00:00Z');
const at = (min: number) => new Date(T0.getTime() + min * MIN);

describe('pace', () => {
	it('four wheels in half an hour to an hour is on target at 7.5 to 15 min per wheel (common practice, no source)', () => {
		for (const [minutes, target] of [
			[30, 30 / 4],
			[60, 60 / 4]
		]) {
			const p = pace({ startedAt: T0, now: at(minutes), wheelsDone: 4, wheelsTotal: 4, targetMinPerWheel: target });
			expect(p.aheadMin).toBeCloseTo(0, 9);
			expect(p.expectedDone).toBeCloseTo(4, 9);
			expect(p.minPerWheel).toBeCloseTo(target, 9);
		}
		// 45 minutes for four wheels: ahead of the slow end of the rule, behind the fast end.
		const done45 = { startedAt: T0, now: at(45), wheelsDone: 4, wheelsTotal: 4 };
		expect(pace({ ...done45, targetMinPerWheel: 15 }).aheadMin).toBeCloseTo(4 * 15 - 45, 9);
		expect(pace({ ...done45, targetMinPerWheel: 7.5 }).aheadMin).toBeCloseTo(4 * 7.5 - 45, 9);
	});
	it('halfway through a job, projects the rest at the pace so far', () => {
		const p = pace({ startedAt: T0, now: at(20), wheelsDone: 2, wheelsTotal: 4, targetMinPerWheel: 12 });
		expect(p.expectedDone).toBeCloseTo(20 / 12, 9);
		expect(p.aheadMin).toBeCloseTo(2 * 12 - 20, 9);
		expect(p.minPerWheel).toBeCloseTo(10, 9);
		expect(p.projectedFinish).toEqual(at(20 + 2 * 10));
	});
	it('before the first wheel, projects at the target and reports no pace yet', () => {
		const p = pace({ startedAt: T0, now: at(5), wheelsDone: 0, wheelsTotal: 4, targetMinPerWheel: 12 });
		expect(p.minPerWheel).toBeNull();
		expect(p.aheadMin).toBeCloseTo(-5, 9);
		expect(p.projectedFinish).toEqual(at(5 + 4 * 12));
	});
	it('caps the expected wheels at the job size, and a finished job projects now', () => {
		const p = pace({ startedAt: T0, now: at(90), wheelsDone: 4, wheelsTotal: 4, targetMinPerWheel: 12 });
		expect(p.expectedDone).toBe(4);
		expect(p.projectedFinish).toEqual(at(90));
		expect(p.aheadMin).toBeCloseTo(48 - 90, 9);
	});
	it('refuses impossible inputs', () => {
		const ok = { startedAt: T0, now: at(10), wheelsDone: 1, wheelsTotal: 4, targetMinPerWheel: 12 };
		expect(() => pace({ ...ok, wheelsDone: 5 })).toThrow(/cannot exceed the job's 4 wheels/);
		expect(() => pace({ ...ok, now: at(-1) })).toThrow(/starts after the current time/);
		expect(() => pace({ ...ok, targetMinPerWheel: 0 })).toThrow(/Target per wheel must be more than 0 minutes/);
		expect(() => pace({ ...ok, wheelsTotal: 0, wheelsDone: 0 })).toThrow(/Wheel count/);
		expect(() => pace({ ...ok, startedAt: new Date('nope') })).toThrow(/Start time must be a valid date/);
	});
	fcTest.prop([
		fc.integer({ min: 1, max: 20 }),
		fc.integer({ min: 0, max: 20 }),
		fc.double({ min: 0, max: 600, noNaN: true }),
		fc.double({ min: 1, max: 60, noNaN: true })
	])(
		'ahead exactly when the wheels done beat the wheels expected, and slower than target means behind',
		(total, d, elapsed, target) => {
			const done = Math.min(d, total);
			const now = at(elapsed);
			const elapsedMin = (now.getTime() - T0.getTime()) / MIN; // a Date keeps whole milliseconds
			const p = pace({ startedAt: T0, now, wheelsDone: done, wheelsTotal: total, targetMinPerWheel: target });
			if (Math.abs(p.aheadMin) > 1e-9) expect(p.aheadMin > 0).toBe(done > elapsedMin / target);
			if (p.minPerWheel !== null && p.minPerWheel > target + 1e-9) expect(p.aheadMin).toBeLessThan(0);
			expect(p.projectedFinish.getTime()).toBeGreaterThanOrEqual(now.getTime());
		}
	);
});

describe('forecastQueue', () => {
	it('sends each job to the bay that frees first; a bay free in the past is free now', () => {
		const slots = forecastQueue({
			now: T0,
			bays: [
				{ id: 'A', freeAt: at(10) },
				{ id: 'B', freeAt: at(-60) }
			],
			jobs: [
				{ id: 'j1', wheels: 4, minPerWheel: 10 },
				{ id: 'j2', wheels: 2, minPerWheel: 10 },
				{ id: 'j3', wheels: 1, minPerWheel: 12 }
			]
		});
		expect(slots).toEqual([
			{ jobId: 'j1', bayId: 'B', start: at(0), finish: at(40) },
			{ jobId: 'j2', bayId: 'A', start: at(10), finish: at(30) },
			{ jobId: 'j3', bayId: 'A', start: at(30), finish: at(42) }
		]);
	});
	it('breaks ties by the order of the bays', () => {
		const slots = forecastQueue({
			now: T0,
			bays: [
				{ id: 'B2', freeAt: at(5) },
				{ id: 'B1', freeAt: at(5) }
			],
			jobs: [
				{ id: 'x', wheels: 4, minPerWheel: 10 },
				{ id: 'y', wheels: 4, minPerWheel: 10 }
			]
		});
		expect(slots.map((s) => s.bayId)).toEqual(['B2', 'B1']);
	});
	it('returns nothing for an empty queue and refuses jobs with no bays', () => {
		expect(forecastQueue({ now: T0, bays: [], jobs: [] })).toEqual([]);
		expect(() => forecastQueue({ now: T0, bays: [], jobs: [{ id: 'x', wheels: 4, minPerWheel: 10 }] })).toThrow(
			/No bays are open/
		);
		expect(() =>
			forecastQueue({ now: T0, bays: [{ id: 'A', freeAt: T0 }], jobs: [{ id: 'x', wheels: 0, minPerWheel: 10 }] })
		).toThrow(/Wheel count of job x/);
	});

	const queue = fc.record({
		bays: fc.array(fc.integer({ min: -120, max: 240 }), { minLength: 1, maxLength: 6 }),
		jobs: fc.array(
			fc.record({ wheels: fc.integer({ min: 1, max: 8 }), minPerWheel: fc.double({ min: 3, max: 30, noNaN: true }) }),
			{
				maxLength: 30
			}
		)
	});
	fcTest.prop([queue])(
		'never overlaps two jobs in a bay, never starts before now or before the bay is free',
		({ bays, jobs }) => {
			const input = {
				now: T0,
				bays: bays.map((m, i) => ({ id: `bay${i}`, freeAt: at(m) })),
				jobs: jobs.map((j, i) => ({ id: `job${i}`, ...j }))
			};
			const slots = forecastQueue(input);
			expect(slots.map((s) => s.jobId)).toEqual(input.jobs.map((j) => j.id));
			for (const [i, s] of slots.entries()) {
				const bay = input.bays.find((b) => b.id === s.bayId)!;
				expect(s.start.getTime()).toBeGreaterThanOrEqual(T0.getTime());
				expect(s.start.getTime()).toBeGreaterThanOrEqual(bay.freeAt.getTime());
				// A Date holds whole milliseconds.
				expect(
					Math.abs(s.finish.getTime() - s.start.getTime() - jobs[i].wheels * jobs[i].minPerWheel * MIN)
				).toBeLessThanOrEqual(1);
			}
			for (const bay of input.bays) {
				const mine = slots.filter((s) => s.bayId === bay.id).sort((a, b) => a.start.getTime() - b.start.getTime());
				for (let i = 1; i < mine.length; i++)
					expect(mine[i].start.getTime()).toBeGreaterThanOrEqual(mine[i - 1].finish.getTime());
			}
			// Jobs keep their order: a later job never starts before an earlier one.
			for (let i = 1; i < slots.length; i++)
				expect(slots[i].start.getTime()).toBeGreaterThanOrEqual(slots[i - 1].start.getTime());
		}
	);
	fcTest.prop([queue])('no job waits while another bay stood free earlier', ({ bays, jobs }) => {
		const slots = forecastQueue({
			now: T0,
			bays: bays.map((m, i) => ({ id: `bay${i}`, freeAt: at(m) })),
			jobs: jobs.map((j, i) => ({ id: `job${i}`, ...j }))
		});
		// Rebuild each bay's free time independently from the slots before each job.
		const free = new Map(bays.map((m, i) => [`bay${i}`, Math.max(T0.getTime(), at(m).getTime())]));
		for (const s of slots) {
			expect(s.start.getTime()).toBe(Math.min(...free.values()));
			free.set(s.bayId, s.finish.getTime());
		}
	});
});

describe('suggestPromise', () => {
	it('adds the buffer and rounds up to the next 5 minutes', () => {
		const finish = new Date('2025-06-02T10:02:30Z');
		expect(suggestPromise(finish, 10)).toEqual(new Date('2025-06-02T10:15:00Z'));
		expect(suggestPromise(new Date('2025-06-02T10:05:00Z'), 10)).toEqual(new Date('2025-06-02T10:15:00Z'));
		expect(suggestPromise(finish, 0, 15)).toEqual(new Date('2025-06-02T10:15:00Z'));
	});
	it('refuses a negative buffer or no step', () => {
		expect(() => suggestPromise(T0, -5)).toThrow(/Buffer must be 0 minutes or more/);
		expect(() => suggestPromise(T0, 5, 0)).toThrow(/Rounding step/);
	});
	fcTest.prop([
		fc.integer({ min: 0, max: 10 ** 9 }),
		fc.integer({ min: 0, max: 120 }),
		fc.constantFrom(1, 5, 10, 15, 30)
	])('is the first whole step at or after finish + buffer', (offsetMs, buffer, step) => {
		const finish = new Date(T0.getTime() + offsetMs);
		const p = suggestPromise(finish, buffer, step).getTime();
		const earliest = finish.getTime() + buffer * MIN;
		expect(p).toBeGreaterThanOrEqual(earliest);
		expect(p - earliest).toBeLessThan(step * MIN);
		expect(p % (step * MIN)).toBe(0);
	});
});

describe('floorCapacity', () => {
	it('one bay does 4 to 8 wheels an hour at the rule of thumb (common practice, no source)', () => {
		expect(floorCapacity(1, 60 / 4)).toBeCloseTo(4 / 1, 9); // four wheels an hour
		expect(floorCapacity(1, 30 / 4)).toBeCloseTo(4 / 0.5, 9); // four wheels a half hour
	});
	it('scales with bays', () => {
		expect(floorCapacity(3, 12)).toBeCloseTo(3 * (60 / 12), 9);
		expect(floorCapacity(0, 12)).toBe(0);
	});
	it('refuses impossible inputs', () => {
		expect(() => floorCapacity(-1, 12)).toThrow(/Bay count/);
		expect(() => floorCapacity(2, 0)).toThrow(/Target per wheel/);
	});
});

import { describe, expect, it } from 'vitest';
import { Board } from '$lib/state/board.svelte';
import { bay, job, NOON, snapshotOf, wheel } from '$lib/state/test-fixtures';
import { backToWaiting, dropBefore, movable, reorder, sendTo, stepWheel, toFinish, toStart } from './selection';

// Bay 1: wheel 10 being worked on, then 11 and 12 (job 2), then 13 (job 3). Job 1 waits with wheels 1–4.
function floor() {
	const snapshot = snapshotOf({
		bays: [bay(1), bay(2)],
		jobs: [job(1), job(2, { state: 'in_progress' }), job(3), job(4, { state: 'in_progress' })],
		wheels: [
			wheel(1, 1),
			wheel(2, 1),
			wheel(3, 1),
			wheel(4, 1),
			wheel(10, 4, { bayId: 1, queuePosition: 1, state: 'working', startedAt: '2026-03-02T11:50:00.000Z' }),
			wheel(11, 2, { bayId: 1, queuePosition: 2 }),
			wheel(12, 2, { bayId: 1, queuePosition: 3 }),
			wheel(13, 3, { bayId: 1, queuePosition: 4 })
		]
	});
	return new Board({ snapshot, now: () => NOON });
}

describe('the selection', () => {
	it('a waiting job sends all its queued wheels; a single wheel sends only itself', () => {
		const b = floor();
		expect(sendTo(b, { kind: 'job', jobId: 1 }, 2)).toEqual({ wheelIds: [1, 2, 3, 4], bayId: 2 });
		expect(sendTo(b, { kind: 'wheel', wheelId: 3 }, 2)).toEqual({ wheelIds: [3], bayId: 2 });
	});

	it("a bay's queue moves its queued wheels, never the one being worked on", () => {
		const b = floor();
		expect(movable(b, { kind: 'bay', bayId: 1 }).map((w) => w.id)).toEqual([11, 12, 13]);
		expect(sendTo(b, { kind: 'bay', bayId: 1 }, 2)).toEqual({ wheelIds: [11, 12, 13], bayId: 2 });
		expect(sendTo(b, { kind: 'bay', bayId: 1 }, 1)).toBeNull();
		expect(backToWaiting(b, { kind: 'bay', bayId: 1 })).toEqual({ wheelIds: [11, 12, 13], bayId: null });
	});

	it('nothing to take back for a job that is all waiting', () => {
		expect(backToWaiting(floor(), { kind: 'job', jobId: 1 })).toBeNull();
	});

	it('reorders a job as a block, one place at a time, never ahead of the working wheel', () => {
		const b = floor();
		// Job 3 (wheel 13) is after job 2's two wheels: one place earlier is place 3 of the bay.
		expect(reorder(b, { kind: 'job', jobId: 3 }, -1)).toEqual({ wheelIds: [13], bayId: 1, queuePosition: 3 });
		expect(reorder(b, { kind: 'job', jobId: 3 }, 1)).toBeNull();
		// Job 2 is right behind the working wheel: it cannot go earlier, and later puts it behind wheel 13.
		expect(reorder(b, { kind: 'job', jobId: 2 }, -1)).toBeNull();
		expect(reorder(b, { kind: 'job', jobId: 2 }, 1)).toEqual({ wheelIds: [11, 12], bayId: 1, queuePosition: 3 });
		expect(reorder(b, { kind: 'wheel', wheelId: 12 }, -1)).toEqual({ wheelIds: [12], bayId: 1, queuePosition: 2 });
		expect(reorder(b, { kind: 'wheel', wheelId: 11 }, -1)).toBeNull();
		expect(reorder(b, { kind: 'wheel', wheelId: 11 }, 1)).toEqual({ wheelIds: [11], bayId: 1, queuePosition: 3 });
		expect(reorder(b, { kind: 'job', jobId: 1 }, -1)).toBeNull();
	});

	it('the board puts a reordered wheel where the move says', async () => {
		const b = floor();
		const m = reorder(b, { kind: 'wheel', wheelId: 13 }, -1)!;
		const seen: string[] = [];
		const fetcher = (async (_url: string, init?: RequestInit) => {
			seen.push(String(init?.body));
			return new Response('{"wheels":[]}', { status: 200 });
		}) as typeof fetch;
		const placed = new Board({
			snapshot: snapshotOf({
				bays: [bay(1), bay(2)],
				jobs: [job(2, { state: 'in_progress' }), job(3), job(4, { state: 'in_progress' })],
				wheels: [
					wheel(10, 4, { bayId: 1, queuePosition: 1, state: 'working', startedAt: '2026-03-02T11:50:00.000Z' }),
					wheel(11, 2, { bayId: 1, queuePosition: 2 }),
					wheel(12, 2, { bayId: 1, queuePosition: 3 }),
					wheel(13, 3, { bayId: 1, queuePosition: 4 })
				]
			}),
			fetch: fetcher,
			now: () => NOON
		});
		const outcome = placed.moveWheels(m.wheelIds, m.bayId, m.queuePosition);
		expect(placed.lanes[0].wheels.map((w) => w.id)).toEqual([10, 11, 13, 12]);
		await outcome;
		expect(JSON.parse(seen[0])).toMatchObject({ bayId: 1, queuePosition: 3 });
		expect(b.lanes[0].wheels.map((w) => w.id)).toEqual([10, 11, 12, 13]);
	});

	it('a drop on a wheel lands just before it', () => {
		const b = floor();
		const target = b.wheel(12)!;
		expect(dropBefore(b, [1, 2], target)).toEqual({ wheelIds: [1, 2], bayId: 1, queuePosition: 3 });
		expect(dropBefore(b, [13], target)).toEqual({ wheelIds: [13], bayId: 1, queuePosition: 3 });
		expect(dropBefore(b, [12], target)).toBeNull();
		expect(dropBefore(b, [12], b.wheel(1)!)).toBeNull();
	});

	it('start takes the selected wheel or the next queued one in a bay; finish the working one', () => {
		const b = floor();
		expect(toStart(b, { kind: 'bay', bayId: 1 })?.id).toBe(11);
		expect(toStart(b, { kind: 'wheel', wheelId: 12 })?.id).toBe(12);
		expect(toStart(b, { kind: 'job', jobId: 1 })).toBeUndefined();
		expect(toFinish(b, { kind: 'bay', bayId: 1 })?.id).toBe(10);
		expect(toFinish(b, { kind: 'job', jobId: 2 })).toBeUndefined();
	});

	it("steps through a job's wheels and wraps around", () => {
		const b = floor();
		expect(stepWheel(b, { kind: 'job', jobId: 1 }, 1)).toEqual({ kind: 'wheel', wheelId: 1 });
		expect(stepWheel(b, { kind: 'job', jobId: 1 }, -1)).toEqual({ kind: 'wheel', wheelId: 4 });
		expect(stepWheel(b, { kind: 'wheel', wheelId: 4 }, 1)).toEqual({ kind: 'wheel', wheelId: 1 });
		expect(stepWheel(b, { kind: 'bay', bayId: 1 }, 1)).toBeNull();
	});
});

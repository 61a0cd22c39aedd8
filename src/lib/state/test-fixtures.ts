// Rows and snapshots for the floor tests, shaped the way the server's views and GET /api/board shape them.
import type { BayView, BoardSnapshot, FloorEvent, JobView, WheelPosition, WheelView } from '$lib/schemas/floor';

export const T0 = '2026-03-02T08:00:00.000Z';
/** Midday on the same UTC day as T0: "today" for the counters. */
export const NOON = new Date('2026-03-02T12:00:00.000Z');

export function job(id: number, over: Partial<JobView> = {}): JobView {
	return {
		id,
		number: 1000 + id,
		state: 'waiting',
		kind: 'waiter',
		promisedAt: `2026-03-02T${String(9 + (id % 10)).padStart(2, '0')}:00:00.000Z`,
		priority: 0,
		notesPreview: '',
		version: 1,
		createdAt: T0,
		startedAt: null,
		doneAt: null,
		customer: { id, name: `Customer ${id}`, phone: '' },
		vehicle: null,
		plate: '',
		services: [],
		...over
	};
}

const positions: WheelPosition[] = ['LF', 'RF', 'LR', 'RR', 'SP'];

export function wheel(id: number, jobId: number, over: Partial<WheelView> = {}): WheelView {
	return {
		id,
		jobId,
		position: positions[id % positions.length],
		bayId: null,
		queuePosition: null,
		state: 'queued',
		techId: null,
		startedAt: null,
		finishedAt: null,
		version: 1,
		...over
	};
}

export function bay(id: number, over: Partial<BayView> = {}): BayView {
	return { id, code: `B${id}`, name: `Bay ${id}`, position: id, active: true, techId: null, techName: null, ...over };
}

/** The snapshot the server would send for these rows: live bay wheels under their bay, waiting jobs whole. */
export function snapshotOf(rows: {
	bays: BayView[];
	jobs: JobView[];
	wheels: WheelView[];
	cursor?: number;
	counters?: BoardSnapshot['counters'];
	timezone?: string;
}): BoardSnapshot {
	const waiting = [...rows.jobs]
		.sort((a, b) => a.promisedAt.localeCompare(b.promisedAt) || a.id - b.id)
		.map((j) => ({
			jobId: j.id,
			wheelIds: rows.wheels.filter((w) => w.jobId === j.id && w.bayId === null && w.state === 'queued').map((w) => w.id)
		}))
		.filter((j) => j.wheelIds.length > 0);
	return {
		store: { id: 1, name: 'Test store', timezone: rows.timezone ?? 'UTC', targetMinPerWheel: 12 },
		bays: rows.bays.map((b) => ({
			...b,
			wheelIds: rows.wheels
				.filter((w) => w.bayId === b.id && w.state !== 'done')
				.sort((x, y) => (x.queuePosition ?? 0) - (y.queuePosition ?? 0))
				.map((w) => w.id)
		})),
		waiting,
		jobs: rows.jobs,
		wheels: rows.wheels,
		counters: rows.counters ?? { wheelsDone: 0, wheelsPlanned: 0, minPerWheel: null },
		cursor: rows.cursor ?? 0
	};
}

export function event(
	id: number,
	rows: Partial<Pick<FloorEvent, 'jobs' | 'wheels' | 'bays'>>,
	type = 'test'
): FloorEvent {
	return { id, type, at: T0, jobs: rows.jobs ?? [], wheels: rows.wheels ?? [], bays: rows.bays ?? [] };
}

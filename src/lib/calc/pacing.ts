/**
 * Pace of the floor: a job or bay against its target minutes per wheel, the queue forecast (when each waiting job
 * starts and finishes), the promise time to give a customer, and the floor's capacity.
 *
 * The model is the shop's own standard minutes per wheel; the rule of thumb that four wheels take half an hour to an
 * hour (7.5–15 min per wheel) is common practice with no source, and a store sets its own target.
 * Times are `Date` instants; durations are minutes.
 */

const MINUTE_MS = 60_000;

function checkDate(d: Date, what: string) {
	if (!(d instanceof Date) || Number.isNaN(d.getTime())) throw new RangeError(`${what} must be a valid date and time`);
}

function checkMinutes(value: number, what: string) {
	if (!(Number.isFinite(value) && value > 0)) throw new RangeError(`${what} must be more than 0 minutes, got ${value}`);
}

function checkWheels(value: number, what: string, min: number) {
	if (!Number.isInteger(value) || value < min)
		throw new RangeError(`${what} must be a whole number of at least ${min}, got ${value}`);
}

export interface PaceInput {
	startedAt: Date;
	now: Date;
	wheelsDone: number;
	wheelsTotal: number;
	targetMinPerWheel: number;
}

export interface Pace {
	/** Wheels the target says should be done by now (fractional, at most the total). */
	expectedDone: number;
	/** Standard minutes earned minus minutes spent: positive when ahead of target. */
	aheadMin: number;
	/** Actual minutes per wheel so far; null until the first wheel is done. */
	minPerWheel: number | null;
	/** Finish at the pace so far (the target pace until a wheel is done); `now` once all wheels are done. */
	projectedFinish: Date;
}

export function pace(p: PaceInput): Pace {
	checkDate(p.startedAt, 'Start time');
	checkDate(p.now, 'Current time');
	checkWheels(p.wheelsTotal, 'Wheel count', 1);
	checkWheels(p.wheelsDone, 'Wheels done', 0);
	if (p.wheelsDone > p.wheelsTotal) {
		throw new RangeError(`Wheels done (${p.wheelsDone}) cannot exceed the job's ${p.wheelsTotal} wheels`);
	}
	checkMinutes(p.targetMinPerWheel, 'Target per wheel');
	const elapsedMin = (p.now.getTime() - p.startedAt.getTime()) / MINUTE_MS;
	if (elapsedMin < 0) throw new RangeError('The job starts after the current time: check the start time and the clock');

	const minPerWheel = p.wheelsDone > 0 ? elapsedMin / p.wheelsDone : null;
	const remaining = p.wheelsTotal - p.wheelsDone;
	return {
		expectedDone: Math.min(p.wheelsTotal, elapsedMin / p.targetMinPerWheel),
		aheadMin: p.wheelsDone * p.targetMinPerWheel - elapsedMin,
		minPerWheel,
		projectedFinish: new Date(p.now.getTime() + remaining * (minPerWheel ?? p.targetMinPerWheel) * MINUTE_MS)
	};
}

export interface QueueInput {
	now: Date;
	bays: { id: string; freeAt: Date }[];
	jobs: { id: string; wheels: number; minPerWheel: number }[];
}

export interface QueueSlot {
	jobId: string;
	bayId: string;
	start: Date;
	finish: Date;
}

/**
 * Forecasts the waiting jobs in the order given, each to the bay that frees first (ties go to the bay listed first),
 * one job at a time per bay. A bay whose `freeAt` is past is free now.
 */
export function forecastQueue(q: QueueInput): QueueSlot[] {
	checkDate(q.now, 'Current time');
	if (q.jobs.length === 0) return [];
	if (q.bays.length === 0) throw new RangeError('No bays are open: open a bay to forecast the queue');
	const now = q.now.getTime();
	const freeAt = q.bays.map((b) => {
		checkDate(b.freeAt, `Free time of bay ${b.id}`);
		return Math.max(now, b.freeAt.getTime());
	});
	return q.jobs.map((job) => {
		checkWheels(job.wheels, `Wheel count of job ${job.id}`, 1);
		checkMinutes(job.minPerWheel, `Minutes per wheel of job ${job.id}`);
		let bay = 0;
		for (let i = 1; i < freeAt.length; i++) if (freeAt[i] < freeAt[bay]) bay = i;
		const start = freeAt[bay];
		// Whole milliseconds, as a Date holds them, so ties between bays are the ties a reader sees.
		const finish = start + Math.round(job.wheels * job.minPerWheel * MINUTE_MS);
		freeAt[bay] = finish;
		return { jobId: job.id, bayId: q.bays[bay].id, start: new Date(start), finish: new Date(finish) };
	});
}

/**
 * The time to promise: `finish` plus a buffer, rounded up to the next `stepMin` of the clock. Steps are counted
 * from midnight UTC, which matches the local clock in every zone whose offset is a whole number of steps.
 */
export function suggestPromise(finish: Date, bufferMin: number, stepMin = 5): Date {
	checkDate(finish, 'Finish time');
	if (!(Number.isFinite(bufferMin) && bufferMin >= 0))
		throw new RangeError(`Buffer must be 0 minutes or more, got ${bufferMin}`);
	checkMinutes(stepMin, 'Rounding step');
	const stepMs = stepMin * MINUTE_MS;
	return new Date(Math.ceil((finish.getTime() + bufferMin * MINUTE_MS) / stepMs) * stepMs);
}

/** Wheels per hour the floor can do with `bays` bays working at the target. */
export function floorCapacity(bays: number, targetMinPerWheel: number): number {
	checkWheels(bays, 'Bay count', 0);
	checkMinutes(targetMinPerWheel, 'Target per wheel');
	return (bays * 60) / targetMinPerWheel;
}

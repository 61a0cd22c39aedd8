// The live floor as one screen knows it: plain data and pure functions, with no Svelte, DOM or network, so the
// rules that keep a screen right (apply by id, never twice, never backwards; predict a move exactly as the
// server will make it) can be tested on their own and replayed at will.
//
// A screen holds two things:
//   - the confirmed floor: the last snapshot plus every event after it, folded in by id. Only the server's word.
//   - a list of its own pending changes: sent, or answered but not yet seen on the stream. They are re-predicted
//     on top of the confirmed floor each time it changes, so an event that lands while a move is in flight is
//     never overwritten, and dropping a pending change gives back exactly the confirmed floor.
import type { BayView, BoardSnapshot, FloorEvent, JobView, WheelState, WheelView } from '$lib/schemas/floor';

export type Counters = BoardSnapshot['counters'];

/** What the floor's own rows added to today's counters (see `countersOf`). */
interface Tally {
	done: number;
	planned: number;
	minutes: number;
}

export interface Floor {
	readonly store: BoardSnapshot['store'];
	readonly bays: ReadonlyMap<number, BayView>;
	readonly jobs: ReadonlyMap<number, JobView>;
	readonly wheels: ReadonlyMap<number, WheelView>;
	/** The newest events.id folded in; the stream resumes after it. */
	readonly cursor: number;
	/** The snapshot's counters, its day in the store's time zone, and what the snapshot's own rows added to them. */
	readonly baseline: { readonly day: string; readonly counters: Counters; readonly tally: Tally };
}

export interface Rows {
	jobs?: readonly JobView[];
	wheels?: readonly WheelView[];
	bays?: readonly BayView[];
}

/** Jobs in these states are history: their rows stay (the counters need them) but they leave every floor list. */
const offFloor = new Set<JobView['state']>(['cancelled', 'collected']);

export function onFloor(job: JobView | undefined): job is JobView {
	return job !== undefined && !offFloor.has(job.state);
}

// ------------------------------------------------------------------ building and folding in

export function fromSnapshot(snapshot: BoardSnapshot, now: Date = new Date()): Floor {
	const wheels = new Map<number, WheelView>();
	// The snapshot lists a wheel under its bay or under its waiting job; a job can be in both places.
	// Every wheel of every job on the floor, done ones included (so a job can show "2 of 4 done"); the bays and the
	// waiting line in the snapshot only refer to them by id, and the lanes are derived from the rows themselves.
	for (const w of snapshot.wheels) wheels.set(w.id, w);
	const jobs = new Map<number, JobView>();
	for (const j of snapshot.jobs) jobs.set(j.id, j);
	const bays = new Map<number, BayView>(snapshot.bays.map(({ wheelIds: _, ...b }) => [b.id, b]));
	const day = dayIn(snapshot.store.timezone);
	const today = day(now.toISOString());
	return {
		store: snapshot.store,
		bays,
		jobs,
		wheels,
		cursor: snapshot.cursor,
		baseline: { day: today, counters: snapshot.counters, tally: tally(wheels, jobs, today, day) }
	};
}

type Newer = (held: { version: number }, incoming: { version: number }) => boolean;

/** Events come in id order, so their rows win, except over a row already known to be newer (a 409's `current`). */
const notOlder: Newer = (held, incoming) => incoming.version >= held.version;
/** A row from an HTTP answer may already be behind the stream; only a strictly higher version is surely newer. */
const strictlyNewer: Newer = (held, incoming) => incoming.version > held.version;

function upsert<T extends { id: number }>(
	map: ReadonlyMap<number, T>,
	rows: readonly T[] | undefined,
	newer?: (held: T, incoming: T) => boolean
): ReadonlyMap<number, T> {
	if (!rows || rows.length === 0) return map;
	let next: Map<number, T> | null = null;
	for (const row of rows) {
		const held = (next ?? map).get(row.id);
		if (held && newer && !newer(held, row)) continue;
		next ??= new Map(map);
		next.set(row.id, row);
	}
	return next ?? map;
}

/**
 * Folds events in, in the order given. An event at or below the cursor is a duplicate or a replay of something
 * already applied and is skipped, so a reconnect that overlaps, or an event that arrives late, changes nothing.
 * Returns the same object when nothing applied.
 */
export function applyEvents(floor: Floor, events: Iterable<FloorEvent>): Floor {
	let { jobs, wheels, bays, cursor } = floor;
	for (const e of events) {
		if (!(e.id > cursor)) continue;
		jobs = upsert(jobs, e.jobs, notOlder);
		wheels = upsert(wheels, e.wheels, notOlder);
		bays = upsert(bays, e.bays);
		cursor = e.id;
	}
	if (cursor === floor.cursor) return floor;
	return { ...floor, jobs, wheels, bays, cursor };
}

export function applyEvent(floor: Floor, event: FloorEvent): Floor {
	return applyEvents(floor, [event]);
}

/**
 * Rows from an HTTP answer (a 409's `current`), outside the event order: taken only where strictly newer than
 * what the screen holds, and the cursor stays, so the stream still brings the rest of that change.
 */
export function applyRows(floor: Floor, rows: Rows): Floor {
	const jobs = upsert(floor.jobs, rows.jobs, strictlyNewer);
	const wheels = upsert(floor.wheels, rows.wheels, strictlyNewer);
	if (jobs === floor.jobs && wheels === floor.wheels) return floor;
	return { ...floor, jobs, wheels };
}

// ------------------------------------------------------------------ what the screens list

export type Lane = BayView & { wheels: WheelView[] };
export type WaitingJob = JobView & { wheels: WheelView[] };

const byPlace = (a: WheelView, b: WheelView) =>
	(a.queuePosition ?? Number.MAX_SAFE_INTEGER) - (b.queuePosition ?? Number.MAX_SAFE_INTEGER) || a.id - b.id;

/** Every bay in floor order with its queued and working wheels in queue order. */
export function lanesOf(floor: Floor): Lane[] {
	const byBay = new Map<number, WheelView[]>();
	for (const w of floor.wheels.values()) {
		if (w.bayId === null || w.state === 'done') continue;
		// A wheel whose job this screen has not seen still holds its place; hiding it would show a gap.
		const job = floor.jobs.get(w.jobId);
		if (job && offFloor.has(job.state)) continue;
		let lane = byBay.get(w.bayId);
		if (!lane) byBay.set(w.bayId, (lane = []));
		lane.push(w);
	}
	return [...floor.bays.values()]
		.sort((a, b) => a.position - b.position || a.id - b.id)
		.map((bay) => ({ ...bay, wheels: (byBay.get(bay.id) ?? []).sort(byPlace) }));
}

export function wheelsByJob(floor: Floor): Map<number, WheelView[]> {
	const out = new Map<number, WheelView[]>();
	for (const w of floor.wheels.values()) {
		let list = out.get(w.jobId);
		if (!list) out.set(w.jobId, (list = []));
		list.push(w);
	}
	for (const list of out.values()) list.sort((a, b) => positionRank(a.position) - positionRank(b.position));
	return out;
}

const positions = ['LF', 'RF', 'LR', 'RR', 'SP'];
const positionRank = (p: string) => positions.indexOf(p);

/** Jobs with at least one wheel not yet in a bay, soonest promise first, each with all of its wheels. */
export function waitingLine(floor: Floor, wheels = wheelsByJob(floor)): WaitingJob[] {
	const out: WaitingJob[] = [];
	for (const job of floor.jobs.values()) {
		if (!onFloor(job)) continue;
		const own = wheels.get(job.id) ?? [];
		if (own.some((w) => w.bayId === null && w.state === 'queued')) out.push({ ...job, wheels: own });
	}
	return out.sort((a, b) => Date.parse(a.promisedAt) - Date.parse(b.promisedAt) || a.id - b.id);
}

// ------------------------------------------------------------------ today's counters

/** A function from an instant to its calendar day (YYYY-MM-DD) in the store's time zone. */
function dayIn(timezone: string): (iso: string) => string {
	let format: Intl.DateTimeFormat;
	try {
		format = new Intl.DateTimeFormat('en-CA', {
			timeZone: timezone,
			year: 'numeric',
			month: '2-digit',
			day: '2-digit'
		});
	} catch {
		// An unknown zone name should not blank the top strip; UTC days are close enough to go on with.
		format = new Intl.DateTimeFormat('en-CA', { timeZone: 'UTC', year: 'numeric', month: '2-digit', day: '2-digit' });
	}
	return (iso) => format.format(new Date(iso));
}

/** The same three sums the server's snapshot makes, over the rows this screen holds. */
function tally(
	wheels: ReadonlyMap<number, WheelView>,
	jobs: ReadonlyMap<number, JobView>,
	today: string,
	day: (iso: string) => string
): Tally {
	const t: Tally = { done: 0, planned: 0, minutes: 0 };
	const promisedToday = new Map<number, boolean>();
	for (const w of wheels.values()) {
		if (w.state === 'done' && w.finishedAt && day(w.finishedAt) === today) {
			t.done += 1;
			if (w.startedAt) t.minutes += (Date.parse(w.finishedAt) - Date.parse(w.startedAt)) / 60_000;
		}
		let planned = promisedToday.get(w.jobId);
		if (planned === undefined) {
			const job = jobs.get(w.jobId);
			planned = job !== undefined && job.state !== 'cancelled' && day(job.promisedAt) === today;
			promisedToday.set(w.jobId, planned);
		}
		if (planned) t.planned += 1;
	}
	return t;
}

/**
 * Today's counters, kept current without reloading: the snapshot's figures, plus how much the rows this screen
 * holds have changed them since. Rows the snapshot did not carry (jobs collected earlier today) cannot change
 * any more, so the difference is exact. After midnight in the store's zone everything counted happened after
 * the snapshot, so the rows alone give the figures.
 */
export function countersOf(floor: Floor, now: Date = new Date()): Counters {
	const day = dayIn(floor.store.timezone);
	const today = day(now.toISOString());
	const t = tally(floor.wheels, floor.jobs, today, day);
	const { baseline } = floor;
	let done = t.done;
	let planned = t.planned;
	let minutes = t.minutes;
	if (today === baseline.day) {
		done += baseline.counters.wheelsDone - baseline.tally.done;
		planned += baseline.counters.wheelsPlanned - baseline.tally.planned;
		minutes += (baseline.counters.minPerWheel ?? 0) * baseline.counters.wheelsDone - baseline.tally.minutes;
	}
	return {
		wheelsDone: done,
		wheelsPlanned: planned,
		minPerWheel: done > 0 ? Math.round((minutes / done) * 10) / 10 : null
	};
}

// ------------------------------------------------------------------ predicting a change as the server makes it

/** A change a screen asks for, in the same terms as the API bodies (without versions). */
export type WheelChange =
	| { kind: 'move'; wheelIds: readonly number[]; bayId: number | null; queuePosition?: number }
	| { kind: 'state'; wheelId: number; to: WheelState; at: string };

export type Prediction = { ok: true; floor: Floor; changed: number[] } | { ok: false; message: string };

const refuse = (message: string): Prediction => ({ ok: false, message });

/** The live wheels of a bay in the server's queue order: working first, then by place, then by id. */
function lane(
	wheels: ReadonlyMap<number, WheelView>,
	bayId: number,
	leaving: ReadonlySet<number> = new Set()
): WheelView[] {
	const out: WheelView[] = [];
	for (const w of wheels.values()) if (w.bayId === bayId && w.state !== 'done' && !leaving.has(w.id)) out.push(w);
	return out.sort((a, b) => Number(b.state === 'working') - Number(a.state === 'working') || byPlace(a, b));
}

/** Gives `ordered` the places 1..n in `draft`, recording which rows changed. */
function writeOrder(draft: Map<number, WheelView>, ordered: readonly WheelView[], changed: Set<number>, bayId: number) {
	ordered.forEach((w, i) => {
		const held = draft.get(w.id)!;
		if (held.queuePosition !== i + 1 || held.bayId !== bayId) {
			draft.set(w.id, { ...held, bayId, queuePosition: i + 1 });
			changed.add(w.id);
		}
	});
}

function jobOf(floor: Floor, w: WheelView) {
	return floor.jobs.get(w.jobId);
}

function predictMove(floor: Floor, change: Extract<WheelChange, { kind: 'move' }>): Prediction {
	const moving: WheelView[] = [];
	for (const id of change.wheelIds) {
		const w = floor.wheels.get(id);
		if (!w) return refuse('That wheel is no longer on the floor.');
		const job = jobOf(floor, w);
		if (job && offFloor.has(job.state))
			return refuse(`Job ${job.number} is ${job.state}: its wheels stay where they are.`);
		if (w.state !== 'queued') {
			const what = w.state === 'working' ? 'being worked on' : 'done';
			return refuse(`Wheel ${w.position} of job ${job?.number ?? '?'} is ${what}: only queued wheels move.`);
		}
		moving.push(w);
	}
	if (moving.length === 0) return refuse('Choose at least one wheel.');
	if (new Set(change.wheelIds).size !== change.wheelIds.length) return refuse('Each wheel only once.');
	const dest = change.bayId === null ? null : floor.bays.get(change.bayId);
	if (dest === undefined) return refuse('No such bay in your store.');
	if (dest && !dest.active) return refuse(`Bay ${dest.code} is out of service.`);

	const leaving = new Set(change.wheelIds);
	const draft = new Map(floor.wheels);
	const changed = new Set<number>(change.wheelIds);
	for (const source of new Set(moving.map((w) => w.bayId))) {
		if (source === null || source === dest?.id) continue;
		writeOrder(draft, lane(floor.wheels, source, leaving), changed, source);
	}
	if (dest) {
		const rest = lane(floor.wheels, dest.id, leaving);
		const working = rest.filter((w) => w.state === 'working').length;
		// The same clamp as the server: never ahead of a wheel being worked on, never past the end.
		const at = Math.min(Math.max((change.queuePosition ?? rest.length + 1) - 1, working), rest.length);
		writeOrder(draft, [...rest.slice(0, at), ...moving, ...rest.slice(at)], changed, dest.id);
	} else {
		for (const w of moving) draft.set(w.id, { ...w, bayId: null, queuePosition: null });
	}
	return { ok: true, floor: { ...floor, wheels: draft }, changed: [...changed] };
}

type Transition = 'start' | 'finish' | 'stop' | 'reopen';

function transition(from: WheelState, to: WheelState): Transition | { message: string } {
	if (from === 'queued' && to === 'working') return 'start';
	if (from === 'working' && to === 'done') return 'finish';
	if (from === 'working' && to === 'queued') return 'stop';
	if (from === 'done' && to === 'queued') return 'reopen';
	if (from === to) return { message: `This wheel is already ${from}.` };
	if (to === 'done') return { message: 'Start the wheel before finishing it.' };
	return { message: 'A done wheel must be reopened before it is started again.' };
}

/** Reopened work goes to the end of its queue; the renumbering that follows gives it its real place. */
const END_OF_QUEUE = 100_000;

function predictState(floor: Floor, change: Extract<WheelChange, { kind: 'state' }>): Prediction {
	const w = floor.wheels.get(change.wheelId);
	if (!w) return refuse('That wheel is no longer on the floor.');
	const job = jobOf(floor, w);
	if (job && offFloor.has(job.state))
		return refuse(`Job ${job.number} is ${job.state}: its wheels can no longer change.`);
	const what = transition(w.state, change.to);
	if (typeof what !== 'string') return refuse(what.message);
	const bay = w.bayId === null ? undefined : floor.bays.get(w.bayId);

	let next: WheelView;
	if (what === 'start') {
		if (!bay) return refuse('Put the wheel in a bay before starting it.');
		if (!bay.active) return refuse(`Bay ${bay.code} is out of service.`);
		// The server picks the technician; the bay's own is the likely answer and is replaced when it comes.
		next = { ...w, state: 'working', startedAt: change.at, finishedAt: null, techId: bay.techId ?? w.techId };
	} else if (what === 'finish') {
		next = { ...w, state: 'done', finishedAt: change.at, queuePosition: null };
	} else if (what === 'stop') {
		next = { ...w, state: 'queued', startedAt: null, techId: null };
	} else {
		const back = bay?.active ? bay.id : null;
		next = {
			...w,
			state: 'queued',
			startedAt: null,
			finishedAt: null,
			techId: null,
			bayId: back,
			queuePosition: back === null ? null : END_OF_QUEUE
		};
	}
	const draft = new Map(floor.wheels);
	draft.set(w.id, next);
	const changed = new Set([w.id]);
	if (w.bayId !== null) writeOrder(draft, lane(draft, w.bayId), changed, w.bayId);
	return { ok: true, floor: { ...floor, wheels: draft }, changed: [...changed] };
}

/** The floor after `change`, worked out the way the server will, or the reason the server would refuse it. */
export function predict(floor: Floor, change: WheelChange): Prediction {
	return change.kind === 'move' ? predictMove(floor, change) : predictState(floor, change);
}

export function targetsOf(change: WheelChange): readonly number[] {
	return change.kind === 'move' ? change.wheelIds : [change.wheelId];
}

// ------------------------------------------------------------------ optimistic changes

export interface Pending {
	readonly key: number;
	readonly change: WheelChange;
	/**
	 * Set when the server accepted: the rows it answered for the wheels asked about. They are newer than the
	 * confirmed floor but arrive outside the event order, so they lend the screen their versions and times while
	 * the places keep coming from the prediction (always gap-free) until the stream brings the same change.
	 */
	readonly answer?: ReadonlyMap<number, WheelView>;
}

export function propose(pending: readonly Pending[], key: number, change: WheelChange): Pending[] {
	return [...pending, { key, change }];
}

/** Forgets a change the server refused; the screen shows the confirmed floor again, with whatever came meanwhile. */
export function rollback(pending: readonly Pending[], key: number): Pending[] {
	return pending.filter((p) => p.key !== key);
}

/** Records the server's 200 answer for a change (`wheels` from the response body). */
export function confirm(pending: readonly Pending[], key: number, rows: readonly WheelView[]): Pending[] {
	return pending.map((p) => {
		if (p.key !== key) return p;
		const targets = new Set(targetsOf(p.change));
		return { ...p, answer: new Map(rows.filter((r) => targets.has(r.id)).map((r) => [r.id, r])) };
	});
}

/**
 * Drops accepted changes that the confirmed floor already shows: every wheel asked about is at the answered
 * version or later (or has left the floor, after a reload). Call after every change to the confirmed floor.
 */
export function settle(floor: Floor, pending: readonly Pending[]): readonly Pending[] {
	const out = pending.filter(
		(p) =>
			!p.answer ||
			[...p.answer.values()].some((row) => {
				const held = floor.wheels.get(row.id);
				return held !== undefined && held.version < row.version;
			})
	);
	return out.length === pending.length ? pending : out;
}

/** The floor as this screen shows it: the confirmed floor with its pending changes predicted on top, in order. */
export function withPending(floor: Floor, pending: readonly Pending[]): Floor {
	let shown = floor;
	for (const p of pending) {
		const predicted = predict(shown, p.change);
		// No longer possible on what the stream has brought since: show the server's word until the answer comes.
		if (!predicted.ok) continue;
		shown = predicted.floor;
		if (!p.answer) continue;
		const wheels = new Map(shown.wheels);
		for (const row of p.answer.values()) {
			const here = wheels.get(row.id);
			if (!here || here.version > row.version) continue;
			wheels.set(row.id, { ...row, bayId: here.bayId, queuePosition: here.queuePosition });
		}
		shown = { ...shown, wheels };
	}
	return shown;
}

/** Wheels with a change on its way to the server, for the screen to mark and to hold further edits on. */
export function pendingWheels(pending: readonly Pending[]): Set<number> {
	const out = new Set<number>();
	for (const p of pending) if (!p.answer) for (const id of targetsOf(p.change)) out.add(id);
	return out;
}

// What the console's selection is and which wheels a command acts on. A lead selects a job (its wheels), one
// wheel, or a bay's queue; the same keys then send, reorder, take back, start and finish. Pure functions over the
// board's view of the floor, so the rules are tested without a screen.
import type { JobView, WheelView } from '$lib/schemas/floor';
import type { Lane } from '$lib/state/floor-model';

export type Selection =
	{ kind: 'job'; jobId: number } | { kind: 'wheel'; wheelId: number } | { kind: 'bay'; bayId: number };

/** The part of the board the selection rules read (the Board class has it). */
export interface FloorView {
	lanes: Lane[];
	job(id: number): JobView | undefined;
	wheelsOf(jobId: number): WheelView[];
	wheel(id: number): WheelView | undefined;
}

/** A move the board can send: these wheels to this bay (at this place in its queue) or back to waiting. */
export interface Move {
	wheelIds: number[];
	bayId: number | null;
	queuePosition?: number;
}

/** The job the selection belongs to, for the focus pane and for stepping through jobs. */
export function jobOf(view: FloorView, sel: Selection | null): JobView | undefined {
	if (!sel) return undefined;
	if (sel.kind === 'job') return view.job(sel.jobId);
	if (sel.kind === 'wheel') {
		const w = view.wheel(sel.wheelId);
		return w ? view.job(w.jobId) : undefined;
	}
	return undefined;
}

/** Every wheel the selection stands for, whatever its state. */
export function wheelsOf(view: FloorView, sel: Selection | null): WheelView[] {
	if (!sel) return [];
	if (sel.kind === 'job') return view.wheelsOf(sel.jobId);
	if (sel.kind === 'wheel') {
		const w = view.wheel(sel.wheelId);
		return w ? [w] : [];
	}
	return view.lanes.find((l) => l.id === sel.bayId)?.wheels ?? [];
}

/** The selected wheels a lead can still move: queued ones, in a bay or waiting. */
export function movable(view: FloorView, sel: Selection | null): WheelView[] {
	return wheelsOf(view, sel).filter((w) => w.state === 'queued');
}

/** The move that sends the selection to a bay's queue (at its end), or null when nothing would change. */
export function sendTo(view: FloorView, sel: Selection | null, bayId: number): Move | null {
	const wheels = movable(view, sel).filter((w) => w.bayId !== bayId);
	return wheels.length ? { wheelIds: wheels.map((w) => w.id), bayId } : null;
}

/** The move that takes the selection's queued bay wheels back to the waiting line, or null. */
export function backToWaiting(view: FloorView, sel: Selection | null): Move | null {
	const wheels = movable(view, sel).filter((w) => w.bayId !== null);
	return wheels.length ? { wheelIds: wheels.map((w) => w.id), bayId: null } : null;
}

/**
 * The move that shifts the selection one place earlier (`by` = -1) or later (+1) in its bay's queue, as a block:
 * a job's queued wheels in one bay move together. Null when the selection is not all queued in one bay, or is
 * already first (behind any wheel being worked on) or last. The server clamps the same way.
 */
export function reorder(view: FloorView, sel: Selection | null, by: -1 | 1): Move | null {
	if (!sel || sel.kind === 'bay') return null;
	const moving = movable(view, sel).filter((w) => w.bayId !== null);
	const bayId = moving[0]?.bayId;
	if (bayId == null || moving.some((w) => w.bayId !== bayId)) return null;
	const lane = view.lanes.find((l) => l.id === bayId);
	if (!lane) return null;
	const ids = new Set(moving.map((w) => w.id));
	const rest = lane.wheels.filter((w) => !ids.has(w.id));
	const working = rest.filter((w) => w.state === 'working').length;
	const now = lane.wheels.findIndex((w) => ids.has(w.id));
	const at = now + by;
	if (at < working || at > rest.length) return null;
	const inOrder = lane.wheels.filter((w) => ids.has(w.id)).map((w) => w.id);
	return { wheelIds: inOrder, bayId, queuePosition: at + 1 };
}

/** Where a dragged selection lands when dropped on a wheel in a lane: just before that wheel. */
export function dropBefore(view: FloorView, wheelIds: readonly number[], target: WheelView): Move | null {
	if (target.bayId === null || wheelIds.includes(target.id)) return null;
	const lane = view.lanes.find((l) => l.id === target.bayId);
	if (!lane) return null;
	const ids = new Set(wheelIds);
	const rest = lane.wheels.filter((w) => !ids.has(w.id));
	const at = rest.findIndex((w) => w.id === target.id);
	return { wheelIds: [...wheelIds], bayId: target.bayId, queuePosition: at + 1 };
}

/** The wheel to start: the selected wheel, or the first queued wheel in a bay of the job or the bay. */
export function toStart(view: FloorView, sel: Selection | null): WheelView | undefined {
	return movable(view, sel).find((w) => w.bayId !== null);
}

/** The wheel to finish: the selected one, or the one being worked on in the job or the bay. */
export function toFinish(view: FloorView, sel: Selection | null): WheelView | undefined {
	return wheelsOf(view, sel).find((w) => w.state === 'working');
}

/** The next or previous wheel of the selected job, for stepping through a job's wheels one at a time. */
export function stepWheel(view: FloorView, sel: Selection | null, by: -1 | 1): Selection | null {
	const job = jobOf(view, sel);
	if (!job) return null;
	const wheels = view.wheelsOf(job.id).filter((w) => w.state !== 'done');
	if (wheels.length === 0) return null;
	const at = sel?.kind === 'wheel' ? wheels.findIndex((w) => w.id === sel.wheelId) : -1;
	const next = at < 0 ? (by > 0 ? 0 : wheels.length - 1) : (at + by + wheels.length) % wheels.length;
	return { kind: 'wheel', wheelId: wheels[next].id };
}

/** Whether a wheel is part of the selection, for outlining it on screen. */
export function covers(view: FloorView, sel: Selection | null, wheel: WheelView): boolean {
	if (!sel) return false;
	if (sel.kind === 'wheel') return sel.wheelId === wheel.id;
	if (sel.kind === 'job') return sel.jobId === wheel.jobId;
	return sel.bayId === wheel.bayId;
}

// Intake's pure helpers: the promise time suggested from the live floor, and the single keys for services.
import { forecastQueue, suggestPromise } from '$lib/calc/pacing';
import type { Lane, WaitingJob } from '$lib/state/floor-model';

/**
 * When a new job of `wheels` wheels could be promised: every bay is free once its queue is done at the target pace,
 * the waiting line goes first in its order, then the new job; a buffer covers the hand-back, rounded up to 5 min.
 */
export function suggestedPromise(
	lanes: readonly Lane[],
	waiting: readonly WaitingJob[],
	wheels: number,
	targetMinPerWheel: number,
	now: Date,
	bufferMin = 10
): Date {
	const open = lanes.filter((l) => l.active);
	if (open.length === 0 || wheels < 1) return suggestPromise(now, bufferMin);
	const bays = open.map((l) => ({
		id: String(l.id),
		freeAt: new Date(now.getTime() + l.wheels.length * targetMinPerWheel * 60_000)
	}));
	const jobs = [
		...waiting
			.map((j) => ({
				id: String(j.id),
				wheels: j.wheels.filter((w) => w.bayId === null).length,
				minPerWheel: targetMinPerWheel
			}))
			.filter((j) => j.wheels > 0),
		{ id: 'new', wheels, minPerWheel: targetMinPerWheel }
	];
	const slots = forecastQueue({ now, bays, jobs });
	return suggestPromise(slots[slots.length - 1].finish, bufferMin);
}

const reserved = new Set(['w', 'd', 'v', 'p', 'n']);

/** One letter per service, from its name, never a key intake already uses. */
export function serviceKeys(services: readonly { code: string; name: string }[]): Map<string, string> {
	const taken = new Set(reserved);
	const keys = new Map<string, string>();
	for (const s of services) {
		const letter = [...s.name.toLowerCase()].find((c) => /[a-z]/.test(c) && !taken.has(c));
		if (!letter) continue;
		taken.add(letter);
		keys.set(s.code, letter);
	}
	return keys;
}

import { describe, expect, it } from 'vitest';
import type { Lane, WaitingJob } from '$lib/state/floor-model';
import { serviceKeys, suggestedPromise } from './intake';

const now = new Date('2026-12-02T15:00:00Z');
const lane = (id: number, queued: number): Lane =>
	({ id, active: true, wheels: Array.from({ length: queued }, () => ({ state: 'queued' })) }) as unknown as Lane;
const waitingJob = (id: number, wheels: number): WaitingJob =>
	({ id, wheels: Array.from({ length: wheels }, () => ({ bayId: null, state: 'queued' })) }) as unknown as WaitingJob;

describe('suggested promise', () => {
	it('waits for the bay that frees first, then the work, then a buffer, rounded up to 5 min', () => {
		// Bay 1 holds 2 wheels (24 min at 12 min/wheel), bay 2 holds 4 (48 min). The new 4-wheel job goes to bay 1 at
		// 15:24 and takes 48 min → 16:12; + 10 min buffer = 16:22 → rounded up to 16:25 (arithmetic from the definition).
		const t = suggestedPromise([lane(1, 2), lane(2, 4)], [], 4, 12, now);
		expect(t.toISOString()).toBe('2026-12-02T16:25:00.000Z');
	});
	it('lets the waiting line go first', () => {
		// One empty bay: the waiting job's 4 wheels take 48 min, then the new job's 4 wheels 48 min → 16:36 + 10 → 16:50.
		const t = suggestedPromise([lane(1, 0)], [waitingJob(7, 4)], 4, 12, now);
		expect(t.toISOString()).toBe('2026-12-02T16:50:00.000Z');
	});
});

describe('service keys', () => {
	it('gives each service its own letter and never a key intake uses', () => {
		const keys = serviceKeys([
			{ code: 'mount-balance', name: 'Mount and balance' },
			{ code: 'mount-only', name: 'Mount only' },
			{ code: 'wheel-check', name: 'Wheel check' }
		]);
		expect(keys.get('mount-balance')).toBe('m');
		expect(keys.get('mount-only')).toBe('o');
		expect(keys.get('wheel-check')).toBe('h');
		expect(new Set(keys.values()).size).toBe(keys.size);
	});
});

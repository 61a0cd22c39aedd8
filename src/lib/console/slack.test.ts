import { describe, expect, it } from 'vitest';
import type { JobView, WheelView } from '$lib/schemas/floor';
import { slackLabel, slackOf } from './slack';

const now = new Date('2026-12-02T15:00:00Z');
const job = (promisedAt: string) => ({ promisedAt }) as JobView;
const wheels = (states: WheelView['state'][]) => states.map((state) => ({ state }) as WheelView);

describe('slack', () => {
	it('is the minutes before the promise minus the work left at target pace', () => {
		// 60 min to the promise, 3 wheels left × 12 min = 36 → 24 min to spare (arithmetic from the definition).
		const s = slackOf(job('2026-12-02T16:00:00Z'), wheels(['queued', 'queued', 'working', 'done']), 12, now);
		expect(s).toEqual({ minutes: 24, late: false });
		expect(slackLabel(s)).toBe('+24 min');
	});
	it('goes negative when the work left does not fit before the promise', () => {
		const s = slackOf(job('2026-12-02T15:30:00Z'), wheels(['queued', 'queued', 'queued', 'queued']), 12, now);
		expect(s.minutes).toBe(-18);
		expect(slackLabel(s)).toBe('-18 min');
	});
	it('says late once the promise has passed', () => {
		const s = slackOf(job('2026-12-02T14:50:00Z'), wheels(['queued']), 12, now);
		expect(s.late).toBe(true);
		expect(slackLabel(s)).toBe('late');
	});
});

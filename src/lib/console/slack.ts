// Slack of a job: minutes left before its promise minus the work still to do at the store's target pace.
// Negative slack means the promise cannot be kept at target pace; a promise already past is late outright.
import type { JobView, WheelView } from '$lib/schemas/floor';

export interface Slack {
	minutes: number;
	late: boolean;
}

export function slackOf(job: JobView, wheels: readonly WheelView[], targetMinPerWheel: number, now: Date): Slack {
	const left = (new Date(job.promisedAt).getTime() - now.getTime()) / 60_000;
	const work = wheels.filter((w) => w.state !== 'done').length * targetMinPerWheel;
	return { minutes: Math.round(left - work), late: left < 0 };
}

export function slackLabel(slack: Slack): string {
	if (slack.late) return 'late';
	return slack.minutes >= 0 ? `+${slack.minutes} min` : `${slack.minutes} min`;
}

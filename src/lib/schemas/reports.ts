// The reports' date range: whole days in the store's time zone, from the first day (included) to the last (excluded),
// so one day is ?from=2026-12-01&to=2026-12-02.
import { z } from 'zod';

export const REPORT_MAX_DAYS = 366;

export const reportNames = ['throughput', 'pace', 'promises', 'waiting', 'force', 'weights', 'ages'] as const;
export type ReportName = (typeof reportNames)[number];
export const reportNameSchema = z.enum(reportNames);

const day = (what: string) =>
	z.iso.date({ error: `Give the ${what} day as YYYY-MM-DD, e.g. ?from=2026-11-01&to=2026-11-02` });

const dayNumber = (date: string) => Date.parse(`${date}T00:00:00Z`) / 86_400_000;

export const reportRangeSchema = z
	.object({ from: day('first'), to: day('end (excluded)') })
	.refine((r) => r.from < r.to, { path: ['to'], message: 'The end must be after the first day (the end is excluded)' })
	.refine((r) => dayNumber(r.to) - dayNumber(r.from) <= REPORT_MAX_DAYS, {
		path: ['to'],
		message: `Report at most ${REPORT_MAX_DAYS} days at a time`
	});
export type ReportRange = z.infer<typeof reportRangeSchema>;

/** The number of days in a range. */
export function rangeDays(range: ReportRange): number {
	return dayNumber(range.to) - dayNumber(range.from);
}

/** The day `days` after `date` (YYYY-MM-DD), by the calendar. */
export function addDays(date: string, days: number): string {
	return new Date(Date.parse(`${date}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);
}

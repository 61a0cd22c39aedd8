// The date range of a CSV export of jobs or wheel records: whole days in the store's time zone, both ends included.
import { z } from 'zod';

/** A year of a busy store's wheel records is a file of tens of MB, about what a spreadsheet still opens. */
export const EXPORT_MAX_DAYS = 366;

const day = (what: string) =>
	z.iso.date({ error: `Give the ${what} day as YYYY-MM-DD, e.g. ?from=2026-11-01&to=2026-11-30` });

const dayNumber = (date: string) => Date.parse(`${date}T00:00:00Z`) / 86_400_000;

export const exportRangeSchema = z
	.object({ from: day('first'), to: day('last') })
	.refine((r) => r.from <= r.to, { path: ['to'], message: 'The last day is before the first: swap them' })
	.refine((r) => dayNumber(r.to) - dayNumber(r.from) < EXPORT_MAX_DAYS, {
		path: ['to'],
		message: `Export at most ${EXPORT_MAX_DAYS} days at a time`
	});
export type ExportRange = z.infer<typeof exportRangeSchema>;

/** The day `days` before `date` (YYYY-MM-DD), by the calendar. */
export function daysBefore(date: string, days: number): string {
	return new Date(Date.parse(`${date}T00:00:00Z`) - days * 86_400_000).toISOString().slice(0, 10);
}

/** Today's date where the store is. */
export function todayIn(timezone: string, now = new Date()): string {
	// en-CA writes dates as YYYY-MM-DD.
	return new Intl.DateTimeFormat('en-CA', {
		timeZone: timezone,
		year: 'numeric',
		month: '2-digit',
		day: '2-digit'
	}).format(now);
}

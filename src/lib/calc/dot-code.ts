/**
 * The date of manufacture in a tire identification number (TIN), and the tire's age.
 *
 * Source: 49 CFR 574.5. The date code is the last group of the TIN: four digits WWYY since the final rule of
 * 8 Jul 1999 (64 FR 36807, effective 2 Jul 2000), three digits WWY before it, which leaves the decade ambiguous.
 * Week 01 is the first full Sunday-to-Saturday week of the year (the rule's example: 0109 = Sun 4 Jan – Sat 10 Jan 2009);
 * the final week may run up to six days into the next year. Since 80 FR 19553 (2015) a new tire's TIN has 13 symbols
 * (3-symbol plant code); older molds still carry 2-symbol plant codes, so the length is not checked.
 * How old is too old is store policy, not law: the tire industry says calendar age alone does not predict service life.
 */

const DAY_MS = 86_400_000;
// The mean Gregorian year, so ages do not drift across leap years.
const YEAR_MS = 365.2425 * DAY_MS;

export interface DotDate {
	week: number;
	year: number;
	/** Sunday 00:00 UTC that starts the production week. */
	weekStart: Date;
	/** Years from the start of the production week to `today` (the oldest the tire can be). */
	ageYears: number;
}

/** Sunday that starts week 01 of `year` (UTC): the first Sunday on or after 1 January. */
export function firstWeekStart(year: number): Date {
	const jan1 = new Date(Date.UTC(year, 0, 1));
	const toSunday = (7 - jan1.getUTCDay()) % 7;
	return new Date(Date.UTC(year, 0, 1 + toSunday));
}

function dateCodeOf(code: string): string {
	const cleaned = code
		.trim()
		.toUpperCase()
		.replace(/^DOT\s*/, '')
		.trim();
	if (cleaned === '') throw new RangeError('Enter the four-digit date code at the end of the TIN, e.g. 4519');
	const groups = cleaned.split(/[\s-]+/);
	const last = groups[groups.length - 1];
	// Written in groups, the last group is the date code whatever its length.
	if (groups.length > 1 || /^\d{3,4}$/.test(last)) return last;
	// Run together: the date code is the trailing digits (at most four; more means the groups were run together).
	const trailing = /\d+$/.exec(last)?.[0] ?? '';
	return trailing.length > 4 ? trailing.slice(-4) : trailing;
}

/**
 * Reads the production week from a full TIN (`DOT U2LL LMLR 5107`) or only its date code (`4519`).
 * `today` defaults to now; it is a parameter so a job's age can be fixed at intake.
 */
export function parseDotDate(code: string, today: Date = new Date()): DotDate {
	if (Number.isNaN(today.getTime())) throw new RangeError('Today must be a valid date to work out the age');
	const dateCode = dateCodeOf(code);
	if (/^\d{3}$/.test(dateCode)) {
		throw new RangeError(
			`Date code ${dateCode} has three digits, so the tire was made before 2000 (week ${dateCode.slice(0, 2)} of 199${dateCode[2]} or earlier): it is over 20 years old`
		);
	}
	if (!/^\d{4}$/.test(dateCode)) {
		throw new RangeError(
			`"${dateCode || code.trim()}" is not a date code: read the four digits at the end of the TIN (week then year, e.g. 4519)`
		);
	}
	const week = Number(dateCode.slice(0, 2));
	const year = 2000 + Number(dateCode.slice(2));
	if (week < 1 || week > 53) {
		throw new RangeError(`Week ${dateCode.slice(0, 2)} in date code ${dateCode} does not exist: weeks run 01 to 53`);
	}
	const weekStart = new Date(firstWeekStart(year).getTime() + (week - 1) * 7 * DAY_MS);
	if (weekStart.getUTCFullYear() !== year) {
		throw new RangeError(`Week ${week} does not exist in ${year} (it has 52 weeks): check date code ${dateCode}`);
	}
	if (weekStart.getTime() > today.getTime()) {
		throw new RangeError(
			`Date code ${dateCode} would be week ${week} of ${year}, which has not started yet: check the reading`
		);
	}
	return { week, year, weekStart, ageYears: (today.getTime() - weekStart.getTime()) / YEAR_MS };
}

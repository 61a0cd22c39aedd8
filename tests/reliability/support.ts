// Hostile values for the reliability tests, and the database snapshot they compare before and after.
//
// JSON bodies are built as trees and written out by hand (not with JSON.stringify of a JS object) so that a body can
// carry what a JS object cannot: number literals such as 1e999 or 9223372036854775808 exactly as typed, duplicate
// keys and `__proto__` as a plain key.
import fc from 'fast-check';
import { withClient } from '../support/database';

// ------------------------------------------------------------------------------------------------ strings

/** Text that has broken servers before: NUL, bidi overrides, emoji sequences, lone surrogates, line separators. */
export const nastyPieces = [
	'\u0000',
	'a\u0000b',
	'\u202e',
	'\u202dlrm\u200f',
	'\u0645\u0631\u062d\u0628\u0627 \u05e9\u05dc\u05d5\u05dd',
	'🛞',
	'👩🏽‍🔧',
	'🏳️‍🌈',
	'\ud800',
	'\udfff',
	'x\ud83d',
	'\ufeff',
	'\u2028\u2029',
	'\r\n',
	'\u001b[31m',
	'\u007f\u0085',
	"'; DROP TABLE jobs; --",
	'%00',
	'../../etc/passwd',
	'<script>alert(1)</script>',
	'${process.exit()}',
	'__proto__',
	'constructor',
	' ',
	''
] as const;

/** One character repeated past 10 KB (in UTF-16 units), ASCII or not. */
const tenKilobytes = fc
	.tuple(
		fc.constantFrom('a', 'é', '🛞', '\u202e', '\u0000', '\u0645', 'x\u0000'),
		fc.integer({ min: 10_240, max: 10_600 })
	)
	.map(([c, n]) => c.repeat(Math.ceil(n / c.length)));

export const hostileString: fc.Arbitrary<string> = fc.oneof(
	{ weight: 3, arbitrary: fc.constantFrom(...nastyPieces) },
	{ weight: 3, arbitrary: fc.string({ unit: 'binary', maxLength: 30 }) },
	{
		weight: 3,
		arbitrary: fc
			.array(fc.oneof(fc.constantFrom(...nastyPieces), fc.string({ maxLength: 8 })), { maxLength: 8 })
			.map((parts) => parts.join(''))
	},
	{ weight: 1, arbitrary: tenKilobytes }
);

/** A string that holds a NUL somewhere: PostgreSQL cannot store one in text, so the app must refuse it (400). */
export const withNul = fc
	.tuple(fc.oneof(fc.constantFrom(...nastyPieces), fc.string({ maxLength: 20 }), tenKilobytes), fc.nat())
	.map(([s, at]) => {
		const i = s.length === 0 ? 0 : at % (s.length + 1);
		return `${s.slice(0, i)}\u0000${s.slice(i)}`;
	});

// ------------------------------------------------------------------------------------------------ numbers

/** Number literals as written in a body: huge, tiny, negative zero, past 2^31, 2^53 and 2^63, non-finite. */
export const wildNumberLiterals = [
	'1e308',
	'-1e308',
	'1.7976931348623157e308',
	'1e999',
	'-1e999',
	'5e-324',
	'1e-400',
	'-0',
	'0.1e1',
	'2147483648',
	'-2147483649',
	'4294967296',
	'9007199254740993',
	'9223372036854775807',
	'9223372036854775808',
	'18446744073709551616',
	'123456789012345678901234567890.123456789'
] as const;

/**
 * Values an integer id, version or count column (int4) cannot hold, or that are no whole positive number: the app
 * must refuse each with 400 before the database sees it.
 */
export const badIntegerLiterals = [
	'0',
	'-0',
	'-1',
	'1.5',
	'2147483648',
	'4294967296',
	'99999999999',
	'9007199254740993',
	'9223372036854775808',
	'1e308',
	'1e999',
	'-1e999'
] as const;

/** The same as form field text, plus words a form might see instead of a number. */
export const badIntegerTexts = [
	...badIntegerLiterals,
	'NaN',
	'Infinity',
	'-Infinity',
	'0x80000000',
	'1e3.5',
	'½',
	'١٢'
];

// ------------------------------------------------------------------------------------------------ JSON trees

export type Json =
	| string
	| boolean
	| null
	| { k: 'num'; text: string }
	| { k: 'arr'; items: Json[] }
	| { k: 'obj'; pairs: [string, Json][] };

export const num = (text: string): Json => ({ k: 'num', text });
export const obj = (pairs: [string, Json][]): Json => ({ k: 'obj', pairs });
export const arr = (items: Json[]): Json => ({ k: 'arr', items });

/** JSON text; strings go through JSON.stringify, which writes lone surrogates as \\udXXX escapes. */
export function jsonText(value: Json): string {
	if (value === null || typeof value === 'boolean') return String(value);
	if (typeof value === 'string') return JSON.stringify(value);
	if (value.k === 'num') return value.text;
	if (value.k === 'arr') return `[${value.items.map(jsonText).join(',')}]`;
	return `{${value.pairs.map(([key, v]) => `${JSON.stringify(key)}:${jsonText(v)}`).join(',')}}`;
}

/** Keys a prototype-pollution or lookup bug would trip over, and plain nonsense. */
export const hostileKey = fc.oneof(
	fc.constantFrom('__proto__', 'constructor', 'prototype', 'toString', 'hasOwnProperty', '__defineGetter__', ''),
	hostileString.filter((s) => s.length < 200)
);

const jsonNumber: fc.Arbitrary<Json> = fc.oneof(
	fc.constantFrom(...wildNumberLiterals).map(num),
	fc.integer().map((n) => num(String(n))),
	fc.double({ noNaN: true, noDefaultInfinity: true }).map((n) => num(Object.is(n, -0) ? '-0' : String(n))),
	fc.bigInt({ min: -(2n ** 70n), max: 2n ** 70n }).map((n) => num(String(n)))
);

/**
 * Wraps a value in `depth` arrays or single-key objects: ~200 levels as the requirement asks, sometimes far more.
 * Written out at once (a raw node), so neither jsonText nor fast-check's printing recurses thousands of levels.
 */
export function nest(inner: Json, depth: number, asObjects: boolean): Json {
	const [open, close] = asObjects ? ['{"a":', '}'] : ['[', ']'];
	return num(open.repeat(depth) + jsonText(inner) + close.repeat(depth));
}

const { tree } = fc.letrec<{ tree: Json }>((tie) => ({
	tree: fc.oneof(
		{ depthSize: 'small', withCrossShrink: true },
		fc.constant(null),
		fc.boolean(),
		jsonNumber,
		hostileString,
		fc.array(tie('tree'), { maxLength: 5 }).map(arr),
		fc.array(fc.tuple(hostileKey, tie('tree')), { maxLength: 5 }).map(obj)
	)
}));

/** Any JSON value, sometimes nested about 200 (or 3,000) levels deep. */
export const hostileJson: fc.Arbitrary<Json> = fc.oneof(
	{ weight: 8, arbitrary: tree },
	{
		weight: 1,
		arbitrary: fc
			.tuple(tree, fc.constantFrom(190, 200, 256, 3_000), fc.boolean())
			.map(([inner, depth, asObjects]) => nest(inner, depth, asObjects))
	}
);

/** Bodies that are not JSON at all, or JSON that JavaScript reads differently from what was written. */
export const notJson: fc.Arbitrary<string> = fc
	.oneof(
		fc.constantFrom(
			'',
			'NaN',
			'-Infinity',
			'Infinity',
			'undefined',
			'{"a":1e999}',
			'{"cursor":NaN}',
			"{'a':1}",
			'{"a":1,}',
			'[1,2',
			'{"notes":"unterminated',
			'\u0000',
			'\ufeff{"a":',
			'{"a":01}',
			'{"a":.5}',
			'{"a":+1}',
			'{"a":0x10}',
			'{"a":"\\ud800"}',
			'{"a":"\\u0000"}',
			'{"a":"\\x00"}',
			'{"__proto__":{"isAdmin":true}}',
			'['.repeat(100_000),
			'{"a":'.repeat(10_000)
		),
		hostileString,
		fc.tuple(tree, fc.nat()).map(([t, cut]) => {
			// A body cut short, as a dropped connection or a proxy might leave it.
			const text = jsonText(t);
			return text.length > 1 ? text.slice(0, cut % text.length) + (text.length % 2 ? '' : '"') : '{';
		})
	)
	// Never an object after all (a random string can be `{}`, which an empty-body route takes); a BOM is skipped
	// by the server's reader, so it is skipped here too.
	.filter((text) => {
		try {
			const value: unknown = JSON.parse(text.replace(/^\ufeff/, ''));
			return typeof value !== 'object' || value === null || Array.isArray(value);
		} catch {
			return true;
		}
	});

// ------------------------------------------------------------------------------------------------ database state

export interface Snapshot {
	counts: Record<string, number>;
	lastEvent: number;
}

export async function snapshot(databaseUrl: string): Promise<Snapshot> {
	return withClient(async (c) => {
		const tables = await c.query<{ table_name: string }>(
			`SELECT table_name FROM information_schema.tables
			 WHERE table_schema = 'public' AND table_type = 'BASE TABLE' ORDER BY table_name`
		);
		const counts: Record<string, number> = {};
		for (const { table_name } of tables.rows) {
			const r = await c.query(`SELECT count(*)::int AS n FROM "${table_name}"`);
			counts[table_name] = r.rows[0].n;
		}
		const last = await c.query(`SELECT coalesce(max(id), 0)::bigint AS id FROM events`);
		return { counts, lastEvent: Number(last.rows[0].id) };
	}, databaseUrl);
}

/**
 * Tables that count attempts on purpose and so may grow under hostile input: `signin_failures` holds one row per
 * e-mail typed at sign-in (and per person a bay PIN was tried for) to slow guessing down. The Knex bookkeeping
 * tables never change after migrating.
 */
export const attemptLogs = new Set(['signin_failures']);

/** What changed between two snapshots, leaving out the attempt logs: empty when nothing was stored. */
export function changes(before: Snapshot, after: Snapshot): string[] {
	const out: string[] = [];
	for (const table of new Set([...Object.keys(before.counts), ...Object.keys(after.counts)])) {
		if (attemptLogs.has(table)) continue;
		if (before.counts[table] !== after.counts[table])
			out.push(`${table}: ${before.counts[table]} → ${after.counts[table]} rows`);
	}
	if (before.lastEvent !== after.lastEvent) out.push(`events: max(id) ${before.lastEvent} → ${after.lastEvent}`);
	return out;
}

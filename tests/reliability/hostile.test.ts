// Hostile input against the built app (`node build`, one instance on its own scratch database):
//   1. every mutating API method and every form action of the authorisation table, 1,000 fast-check runs each, with
//      bodies that can never be accepted: only 400/413/415/422 with `{ code, message, issues }`, never a 2xx or 5xx,
//      and no row written (every table's row count and the last event id unchanged);
//   2. bodies over the 1 MiB JSON limit and over BODY_SIZE_LIMIT (declared and chunked): 413, nothing stored;
//   3. cross-site requests (a foreign Origin, no Origin, text/plain bodies) and non-JSON content types: refused.
// Run: `npx vite build`, then `LUGLINE_SUITE=reliability npx vitest run tests/reliability/hostile.test.ts`.
// HOSTILE_RUNS overrides the 1,000 runs for a quick look; the requirement is 1,000.
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3';
import { parse as devalueParse } from 'devalue';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { authorisation } from '../../src/lib/server/authz';
import { account } from '../support/accounts';
import { urlFor } from '../support/routes';
import { siUnits } from '../../src/lib/console/display';
import { vehicleColumns } from '../../src/lib/schemas/vehicles';
import { withClient } from '../support/database';
import { signIn, startInstances, stopInstances, testS3, type Instance } from '../support/instances';
import { createScratch, dropScratch, knexCli } from '../support/scratch';
import {
	arr,
	badIntegerLiterals,
	badIntegerTexts,
	changes,
	hostileJson,
	hostileKey,
	hostileString,
	jsonText,
	notJson,
	num,
	obj,
	snapshot,
	withNul,
	type Json,
	type Snapshot
} from './support';

const RUNS = Number(process.env.HOSTILE_RUNS ?? 1000);
const DATABASE = 'lugline_hostile';
const PORT = 3700;
const FOREIGN = 'http://evil.example';

/** Refusals of bad input; anything else (a 2xx, 404/409 that means the input was taken as valid, a 5xx) fails. */
const REFUSED = [400, 413, 415, 422];
// Sign-in and the bay claim count wrong attempts per account and answer 429 once an account is being slowed down.
const REFUSED_OR_SLOWED = [...REFUSED, 429];

// ------------------------------------------------------------------------------------------------ state

let instance: Instance;
let databaseUrl: string;
let origin: string;
const cookies: { manager: string; lead: string } = { manager: '', lead: '' };

/** Real rows of the seeded demo store, so plausible fields get past validation and only the planted fault remains. */
interface Facts {
	customerId: number;
	job: { id: number; version: number };
	wheel: { id: number; version: number; recordVersion: number };
	otherWheel: { id: number; version: number };
	bays: { id: number; code: string; version: number }[];
	techId: number;
	person: { id: number; version: number };
	service: { id: number; version: number };
	storeVersion: number;
	vehicle: Record<string, string>;
}
let facts: Facts;

async function readFacts(): Promise<Facts> {
	return withClient(async (c) => {
		const store = (await c.query(`SELECT id, version FROM stores WHERE slug = 'demo'`)).rows[0];
		const one = async (sql: string, params: unknown[] = []) => (await c.query(sql, params)).rows[0];
		const job = await one('SELECT id, version FROM jobs WHERE id = 1 AND store_id = $1', [store.id]);
		const wheel = await one('SELECT id, version FROM wheels WHERE id = 1');
		const record = await one('SELECT version FROM wheel_records WHERE wheel_id = 1');
		const otherWheel = await one('SELECT id, version FROM wheels WHERE job_id = $1 AND id <> 1 ORDER BY id', [job.id]);
		const bays = (await c.query('SELECT id, code, version FROM bays WHERE store_id = $1 ORDER BY position', [store.id]))
			.rows;
		const tech = await one(`SELECT id FROM users WHERE store_id = $1 AND role = 'tech' ORDER BY id`, [store.id]);
		const person = await one(`SELECT id, version FROM users WHERE email = $1`, [account('writer').email]);
		const service = await one('SELECT id, version FROM services WHERE store_id = $1 ORDER BY id', [store.id]);
		const customer = await one('SELECT id FROM customers WHERE store_id = $1 ORDER BY id', [store.id]);
		const vehicle = await one('SELECT * FROM vehicles WHERE id = 1');
		return {
			customerId: customer.id,
			job,
			wheel: { ...wheel, recordVersion: record?.version ?? 0 },
			otherWheel,
			bays,
			techId: tech.id,
			person,
			service,
			storeVersion: store.version,
			vehicle: Object.fromEntries(Object.entries(vehicle).map(([k, v]) => [k, v === null ? '' : String(v)]))
		};
	}, databaseUrl);
}

// ------------------------------------------------------------------------------------------------ addresses

// Concrete addresses for route ids: tests/support/routes.ts (shared with the role matrix).

const MUTATING = ['POST', 'PUT', 'PATCH', 'DELETE'] as const;

interface ApiTarget {
	key: string;
	routeId: string;
	method: string;
	url: string;
}
interface ActionTarget {
	key: string;
	routeId: string;
	action: string;
	url: string;
}

/** Every mutating API method and every form action in the table (signing out excepted: it is meant to work). */
const apiTargets: ApiTarget[] = [];
const actionTargets: ActionTarget[] = [];
for (const [routeId, rule] of Object.entries(authorisation)) {
	if (rule.kind === 'api') {
		for (const method of MUTATING)
			if (rule.methods[method]) apiTargets.push({ key: `${method} ${routeId}`, routeId, method, url: urlFor(routeId) });
	} else if (routeId !== '/signout') {
		for (const action of Object.keys(rule.actions ?? {})) {
			const base = urlFor(routeId);
			actionTargets.push({
				key: `${routeId} ?/${action}`,
				routeId,
				action,
				url: action === 'default' ? base : `${base}?/${action}`
			});
		}
	}
}

// ------------------------------------------------------------------------------------------------ JSON bodies

interface JsonField {
	/** A value the schema takes (real ids and versions from the seed). */
	plausible: () => Json;
	/** Values the app must refuse with 400 whatever the other fields hold (see the contract in the header). */
	breaker?: fc.Arbitrary<Json>;
}

const badId = fc.oneof(
	{ weight: 4, arbitrary: fc.constantFrom(...badIntegerLiterals).map(num) },
	{ weight: 1, arbitrary: fc.oneof(hostileString, fc.boolean(), fc.constant(arr([]))) as fc.Arbitrary<Json> }
);
/**
 * Out of range for a field that takes 0 and up (a measurement, a record version, a cursor): never 0 or -0. Whole-number
 * fields add '1.5'; a measurement may well be 1.5.
 */
const outOfRange = (...more: string[]) =>
	fc.constantFrom('-1', '1e308', '1e999', '-1e999', '9223372036854775808', ...more).map(num);
const notOneOf = (values: readonly string[]) =>
	hostileString.filter((s) => !values.includes(s.trim()) && !values.includes(s)) as fc.Arbitrary<Json>;
const nulText = withNul as fc.Arbitrary<Json>;
const future = () => new Date(Date.now() + 3_600_000).toISOString();

/** The fields of each JSON endpoint, by `METHOD routeId`. Routes with no body fields still get poisoned bodies. */
const jsonFields = (): Record<string, Record<string, JsonField>> => ({
	'POST /api/jobs': {
		customerId: { plausible: () => num(String(facts.customerId)), breaker: badId },
		customer: {
			plausible: () => obj([['name', 'Invented Hostile Customer']]),
			breaker: withNul.map((name) => obj([['name', name]]))
		},
		vehicleId: { plausible: () => num('1'), breaker: badId },
		plate: { plausible: () => 'HOST 1', breaker: nulText },
		services: { plausible: () => arr(['mount-balance']), breaker: withNul.map((s) => arr([s])) },
		wheels: {
			plausible: () => arr(['LF', 'RF']),
			breaker: notOneOf(['LF', 'RF', 'LR', 'RR', 'SP']).map((w) => arr([w]))
		},
		kind: { plausible: () => 'waiter', breaker: notOneOf(['waiter', 'drop_off']) },
		promisedAt: { plausible: future, breaker: hostileString as fc.Arbitrary<Json> },
		priority: { plausible: () => num('3'), breaker: outOfRange('1.5', '10', '2147483648') },
		notes: { plausible: () => 'Invented hostile test', breaker: nulText }
	},
	'PATCH /api/jobs/[id=id]': {
		version: { plausible: () => num(String(facts.job.version)), breaker: badId },
		kind: { plausible: () => 'drop_off', breaker: notOneOf(['waiter', 'drop_off']) },
		promisedAt: { plausible: future, breaker: hostileString as fc.Arbitrary<Json> },
		priority: { plausible: () => num('4'), breaker: outOfRange('1.5', '10', '2147483648') },
		notes: { plausible: () => 'Invented hostile note', breaker: nulText },
		state: { plausible: () => 'cancelled', breaker: notOneOf(['cancelled', 'collected']) }
	},
	'POST /api/jobs/[id=id]/summary': {},
	'PATCH /api/wheels/[id=id]': {
		version: { plausible: () => num(String(facts.wheel.version)), breaker: badId },
		bayId: { plausible: () => num(String(facts.bays[1].id)), breaker: badId },
		queuePosition: { plausible: () => num('1'), breaker: outOfRange('1.5', '0', '10001', '2147483648') },
		state: { plausible: () => 'working', breaker: notOneOf(['queued', 'working', 'done']) }
	},
	'POST /api/wheels/move': {
		wheels: {
			plausible: () =>
				arr([
					obj([
						['id', num(String(facts.wheel.id))],
						['version', num(String(facts.wheel.version))]
					]),
					obj([
						['id', num(String(facts.otherWheel.id))],
						['version', num(String(facts.otherWheel.version))]
					])
				]),
			breaker: fc.tuple(badId, fc.boolean()).map(([bad, asId]) =>
				arr([
					obj(
						asId
							? [
									['id', bad],
									['version', num('1')]
								]
							: [
									['id', num(String(facts.wheel.id))],
									['version', bad]
								]
					)
				])
			)
		},
		bayId: { plausible: () => num(String(facts.bays[1].id)), breaker: badId },
		queuePosition: { plausible: () => num('1'), breaker: outOfRange('1.5', '0', '10001', '2147483648') }
	},
	'PUT /api/wheels/[id=id]/record': {
		version: { plausible: () => num(String(facts.wheel.recordVersion)), breaker: outOfRange('1.5', '2147483648') },
		treadDepthMm: { plausible: () => num('6.5'), breaker: outOfRange('21') },
		dotCode: { plausible: () => '2319', breaker: nulText },
		pressureSetKpa: { plausible: () => num('230'), breaker: outOfRange('701') },
		weights: {
			plausible: () =>
				arr([
					obj([
						['plane', 'inner'],
						['type', 'clip'],
						['grams', num('15')],
						['angleDeg', num('90')]
					])
				]),
			breaker: outOfRange('201', '0').map((grams) =>
				arr([
					obj([
						['plane', 'inner'],
						['type', 'clip'],
						['grams', grams],
						['angleDeg', num('90')]
					])
				])
			)
		},
		forceBeforeN: { plausible: () => num('120'), breaker: outOfRange('2001') },
		forceAfterN: { plausible: () => num('80'), breaker: outOfRange('2001') },
		matchMounted: { plausible: () => true, breaker: hostileString as fc.Arbitrary<Json> },
		matchMountDeg: { plausible: () => num('45'), breaker: outOfRange('361') },
		torqueAppliedNm: { plausible: () => num('110'), breaker: outOfRange('1001') },
		damage: {
			plausible: () =>
				obj([
					['tire', arr([])],
					['rim', arr([])]
				]),
			breaker: withNul.map((kind) => obj([['tire', arr([kind])]]))
		},
		notes: { plausible: () => 'Invented hostile record note', breaker: nulText }
	},
	'POST /api/bays/[code=code]/claim': {
		userId: { plausible: () => num(String(facts.techId)), breaker: badId },
		pin: { plausible: () => '9876', breaker: hostileString.filter((s) => !/^\d{4,8}$/.test(s)) as fc.Arbitrary<Json> }
	},
	'POST /api/events': {
		// 0 to 2^53 - 1 is a valid cursor, so only what lies outside (or is no number) breaks it.
		cursor: { plausible: () => num('0'), breaker: outOfRange('1.5', '9007199254740993', '1e16') }
	}
});

/** Fields left out of a valid body: one of customerId and customer; a move or a state change, not both. */
const exclusive: Record<string, string[]> = {
	'POST /api/jobs': ['customerId', 'vehicleId'],
	'PATCH /api/wheels/[id=id]': ['state', 'queuePosition'],
	'PATCH /api/jobs/[id=id]': ['state']
};

/** An object body with the endpoint's fields (plausible or hostile) and at least one planted fault. */
function poisonedObject(fields: Record<string, JsonField>, omit: string[] = []): fc.Arbitrary<Json> {
	const names = Object.keys(fields);
	const mixed = fc.record(
		Object.fromEntries(
			names.map((n) => [
				n,
				fc.option(fc.oneof({ weight: 3, arbitrary: fc.constant(null).map(() => fields[n].plausible()) }, hostileJson), {
					nil: undefined
				})
			])
		) as Record<string, fc.Arbitrary<Json | undefined>>
	);
	// A third of the bodies are a valid body plus the planted fault alone: only these reach the database with it.
	const clean = fc
		.constant(null)
		.map(() => Object.fromEntries(names.filter((n) => !omit.includes(n)).map((n) => [n, fields[n].plausible()])));
	const fieldValues = fc.oneof({ weight: 2, arbitrary: mixed }, { weight: 1, arbitrary: clean });
	// An unknown key: every JSON body schema is strict, so any key it does not list is refused.
	const poisonKey = fc.tuple(
		hostileKey.filter((k) => !names.includes(k)),
		hostileJson
	) as fc.Arbitrary<[string, Json]>;
	const breakers = names
		.filter((n) => fields[n].breaker)
		.map((n) => fields[n].breaker!.map((v) => [n, v] as [string, Json]));
	const planted = breakers.length ? fc.oneof(poisonKey, ...breakers) : poisonKey;
	return fc
		.tuple(fieldValues, planted, fc.nat(), fc.array(fc.tuple(hostileKey, hostileJson), { maxLength: 2 }))
		.map(([values, [plantedKey, plantedValue], at, extra]) => {
			// The planted pair is the only one with its key, so a later duplicate cannot override it.
			const pairs: [string, Json][] = Object.entries(values).filter(
				(e): e is [string, Json] => e[1] !== undefined && e[0] !== plantedKey
			);
			for (const [k, v] of extra) if (k !== plantedKey && !names.includes(k)) pairs.push([k, v]);
			pairs.splice(at % (pairs.length + 1), 0, [plantedKey, plantedValue]);
			return obj(pairs);
		});
}

interface RawBody {
	text: string;
	/** What the body says it is; mostly JSON, sometimes a variant a lax check might take. */
	contentType: string;
}

function jsonBodies(fields: Record<string, JsonField>, omit: string[] = []): fc.Arbitrary<RawBody> {
	const topLevel = hostileJson.filter((j) => !(j !== null && typeof j === 'object' && j.k === 'obj'));
	const text = fc.oneof(
		{ weight: 6, arbitrary: poisonedObject(fields, omit).map(jsonText) },
		{ weight: 1, arbitrary: topLevel.map(jsonText) },
		{ weight: 2, arbitrary: notJson }
	);
	const type = fc.constantFrom(
		'application/json',
		'application/json',
		'application/json; charset=utf-8',
		'Application/JSON',
		'application/json; charset=utf-16'
	);
	return fc.record({ text, contentType: type });
}

// ------------------------------------------------------------------------------------------------ form bodies

interface FormField {
	plausible: () => string;
	breaker?: fc.Arbitrary<string>;
}
type FormValue = string | { file: string; name: string; type: string };
interface FormBody {
	multipart: boolean;
	pairs: [string, FormValue][];
}

const badIdText = fc.oneof(
	{ weight: 4, arbitrary: fc.constantFrom(...badIntegerTexts) },
	{
		weight: 1,
		// Hostile text that does not read as a small number (which could be a real row's id or version).
		arbitrary: hostileString.filter((s) => {
			const n = Number(s);
			return !(Number.isFinite(n) && Math.abs(n) <= 2 ** 31);
		})
	}
);
const ref = (row: () => { id: number; version: number }): Record<string, FormField> => ({
	id: { plausible: () => String(row().id), breaker: badIdText },
	version: { plausible: () => String(row().version), breaker: badIdText }
});
const nulField = (plausible: string): FormField => ({ plausible: () => plausible, breaker: withNul });
const roleField: FormField = {
	plausible: () => 'tech',
	breaker: hostileString.filter((s) => !['tech', 'writer', 'lead', 'manager'].includes(s.trim()))
};
const bay = () => facts.bays[facts.bays.length - 1];

const unitDefaults: Record<string, string> = { ...siUnits };

/** The fields of each form action, by `routeId ?/action`; `files: false` where a file would make a valid upload. */
const formFields = (): Record<string, { fields: Record<string, FormField>; files?: boolean; allow?: number[] }> => ({
	'/signin ?/default': {
		// Nothing is planted: no generated e-mail and password belong to an account, so every attempt is refused.
		fields: {
			// An address no account has: after five tries it is slowed down (429), which also keeps this property fast.
			email: { plausible: () => 'nobody@demo.lugline.test' },
			password: { plausible: () => 'not-the-password' },
			redirectTo: { plausible: () => '//evil.example/' }
		},
		allow: REFUSED_OR_SLOWED
	},
	'/(staff)/manage ?/add': {
		fields: {
			name: nulField('Invented Hostile Person'),
			email: { plausible: () => 'hostile.person@demo.lugline.test', breaker: withNul },
			role: roleField,
			// A password is hashed, never stored as typed, so its text cannot break a write: not a breaker.
			password: { plausible: () => 'invented-password-1', breaker: fc.string({ maxLength: 11 }) }
		}
	},
	'/(staff)/manage ?/role': { fields: { ...ref(() => facts.person), role: roleField } },
	'/(staff)/manage ?/disable': { fields: ref(() => facts.person) },
	'/(staff)/manage ?/enable': { fields: ref(() => facts.person) },
	'/(staff)/manage ?/password': {
		fields: { ...ref(() => facts.person), password: { plausible: () => 'invented-password-2' } }
	},
	'/(staff)/manage ?/pin': {
		fields: { ...ref(() => facts.person), pin: { plausible: () => '4321', breaker: withNul } }
	},
	'/(staff)/manage/bays ?/add': {
		fields: {
			code: {
				plausible: () => 'HX9',
				breaker: hostileString.filter((s) => !/^[A-Za-z0-9][A-Za-z0-9-]{0,11}$/.test(s.trim()))
			},
			name: nulField('Invented hostile bay')
		}
	},
	'/(staff)/manage/bays ?/rename': { fields: { ...ref(bay), name: nulField('Invented renamed bay') } },
	'/(staff)/manage/bays ?/up': { fields: ref(bay) },
	'/(staff)/manage/bays ?/down': { fields: ref(() => facts.bays[0]) },
	'/(staff)/manage/bays ?/out': { fields: ref(bay) },
	'/(staff)/manage/bays ?/in': { fields: ref(bay) },
	'/(staff)/manage/services ?/add': { fields: serviceFields() },
	'/(staff)/manage/services ?/save': { fields: { ...ref(() => facts.service), ...serviceFields() } },
	'/(staff)/manage/settings ?/save': {
		fields: {
			version: { plausible: () => String(facts.storeVersion), breaker: badIdText },
			name: nulField('Invented Demo Store'),
			phone: nulField('555 0100'),
			email: { plausible: () => '' },
			address: nulField('1 Invented Road'),
			timezone: { plausible: () => 'UTC', breaker: withNul },
			...Object.fromEntries(Object.entries(unitDefaults).map(([k, v]) => [k, { plausible: () => v }])),
			// Each with values outside its own range: 1.5 minutes per wheel and 0 re-torque days are valid settings.
			targetMinPerWheel: { plausible: () => '12', breaker: fc.constantFrom('0', '-1', '241', '1e999', 'NaN', '1e308') },
			forceLimit: { plausible: () => '100' },
			weightIncrement: { plausible: () => '5' },
			leadAllowed: { plausible: () => 'on' },
			tireAgeLimitYears: { plausible: () => '6', breaker: fc.constantFrom('0', '-1', '1.5', '31', '1e999', 'NaN') },
			noticesEnabled: { plausible: () => '' },
			retorqueAfterDays: { plausible: () => '0', breaker: fc.constantFrom('-1', '1.5', '61', '2147483648', 'Infinity') }
		}
	},
	'/(staff)/manage/vehicles/[id=id] ?/save': {
		fields: {
			version: { plausible: () => facts.vehicle.version, breaker: badIdText },
			...Object.fromEntries(
				vehicleColumns.map((c) => [
					c,
					{
						plausible: () => facts.vehicle[c] ?? '',
						breaker: ['make', 'model', 'notes', 'source'].includes(c) ? withNul : undefined
					}
				])
			)
		}
	},
	// The CSV file is never sent as a file here (a real file is a valid upload: its preview is a success), only as
	// text or missing, so every request is refused.
	'/(staff)/manage/vehicles/import ?/preview': {
		fields: { file: { plausible: () => 'make,model' }, token: { plausible: () => 'x' } },
		files: false
	},
	'/(staff)/manage/vehicles/import ?/import': {
		fields: { file: { plausible: () => 'make,model' }, token: { plausible: () => 'sha256:0:0' } },
		files: false
	}
});

function serviceFields(): Record<string, FormField> {
	return {
		code: {
			plausible: () => 'hostile-svc',
			breaker: hostileString.filter((s) => !/^[a-z0-9][a-z0-9-]{0,31}$/.test(s.trim()))
		},
		name: nulField('Invented hostile service'),
		standardMinutes: { plausible: () => '15', breaker: fc.constantFrom('1e999', 'NaN', '601', '-1', 'Infinity') },
		per: { plausible: () => 'wheel', breaker: hostileString.filter((s) => !['wheel', 'job'].includes(s.trim())) },
		needsBalance: { plausible: () => 'on' },
		active: { plausible: () => 'on' }
	};
}

const hostileFile = fc.record({
	// Never a picture or a CSV anyone means: a leading X rules out every image signature.
	file: hostileString.map((s) => `X${s}`),
	name: hostileString.filter((s) => s.length < 300),
	type: fc.constantFrom('image/jpeg', 'text/csv', 'application/octet-stream', 'image/svg+xml')
});

function formBodies(
	fields: Record<string, FormField>,
	{ files = true }: { files?: boolean } = {}
): fc.Arbitrary<FormBody> {
	const names = Object.keys(fields);
	const value = (n: string): fc.Arbitrary<FormValue> =>
		fc.oneof(
			{ weight: 3, arbitrary: fc.constant(null).map(() => fields[n].plausible()) },
			{ weight: 2, arbitrary: hostileString },
			...(files ? [{ weight: 1, arbitrary: hostileFile as fc.Arbitrary<FormValue> }] : [])
		);
	const mixed = fc.record(
		Object.fromEntries(names.map((n) => [n, fc.option(value(n), { nil: undefined, freq: 6 })])) as Record<
			string,
			fc.Arbitrary<FormValue | undefined>
		>
	);
	// A third of the bodies are the form as a page fills it in, plus the planted fault alone: with a long form (store
	// settings, a vehicle record) only these get past validation to the database.
	const clean = fc
		.constant(null)
		.map(() => Object.fromEntries(names.map((n) => [n, fields[n].plausible()])) as Record<string, FormValue>);
	const values = fc.oneof({ weight: 2, arbitrary: mixed }, { weight: 1, arbitrary: clean });
	const breakers = names
		.filter((n) => fields[n].breaker)
		.map((n) => fields[n].breaker!.map((v) => [n, v] as [string, FormValue]));
	// Every body gets a planted fault where the form has one; the others (sign-in, the CSV import) cannot succeed anyway.
	const planted = breakers.length ? fc.oneof(...breakers) : fc.constant(undefined);
	// Names no form has: a handler that loops over every field, or copies them onto an object, meets these too.
	const extra = fc.array(fc.tuple(hostileKey, files ? fc.oneof(hostileString, hostileFile) : hostileString), {
		maxLength: 3
	});
	return fc
		.tuple(fc.boolean(), values, planted, extra, fc.nat())
		.map(([multipart, vals, plantedPair, extraPairs, at]) => {
			const pairs: [string, FormValue][] = Object.entries(vals).filter(
				(e): e is [string, FormValue] => e[1] !== undefined && e[0] !== plantedPair?.[0]
			);
			for (const [k, v] of extraPairs) if (!names.includes(k)) pairs.push([k, v]);
			if (plantedPair) pairs.splice(at % (pairs.length + 1), 0, plantedPair);
			return { multipart: multipart || pairs.some(([, v]) => typeof v !== 'string'), pairs };
		});
}

function encodeForm(body: FormBody): URLSearchParams | FormData {
	if (!body.multipart) {
		const params = new URLSearchParams();
		for (const [k, v] of body.pairs) params.append(k, typeof v === 'string' ? v : v.file);
		return params;
	}
	const form = new FormData();
	for (const [k, v] of body.pairs) {
		if (typeof v === 'string') form.append(k, v);
		else form.append(k, new Blob([v.file], { type: v.type }), v.name);
	}
	return form;
}

// ------------------------------------------------------------------------------------------------ answers

interface Finding {
	/** What kind of wrong answer: the same kind is reported once, with its smallest example. */
	kind: string;
	detail: string;
}

function errorShape(body: unknown): string | null {
	const b = body as { code?: unknown; message?: unknown; issues?: unknown } | null;
	if (!b || typeof b !== 'object') return 'the body is not an object';
	if (typeof b.code !== 'string' || b.code === '') return 'no `code`';
	if (typeof b.message !== 'string' || b.message === '') return `code ${b.code}: no \`message\``;
	if (!Array.isArray(b.issues)) return `code ${b.code}: no \`issues\` array`;
	return null;
}

async function judgeApi(response: Response, allowed: number[], code?: string): Promise<Finding | null> {
	// An accepted request to the event stream would never end: note it and hang up.
	if (response.headers.get('content-type')?.includes('text/event-stream')) {
		await response.body?.cancel();
		return { kind: `${response.status} event stream opened`, detail: '' };
	}
	const text = await response.text();
	let body: unknown;
	try {
		body = JSON.parse(text);
	} catch {
		return { kind: `${response.status}, not JSON`, detail: text.slice(0, 300) };
	}
	if (!allowed.includes(response.status))
		return { kind: `${response.status} ${(body as { code?: string })?.code ?? ''}`, detail: text.slice(0, 300) };
	const shape = errorShape(body);
	if (shape) return { kind: `${response.status} ${shape}`, detail: text.slice(0, 300) };
	if (code && (body as { code: string }).code !== code)
		return { kind: `${response.status} ${(body as { code: string }).code}, not ${code}`, detail: text.slice(0, 300) };
	return null;
}

/**
 * A form action answered as SvelteKit's `enhance` asks for it (accept: application/json, x-sveltekit-action): HTTP
 * 200 with `{ type: 'failure', status, data }` where `data` is devalue's text; or, for a refusal before the action
 * runs (a content type SvelteKit does not read as a form), `{ type: 'error' }` with the status on the response.
 */
async function judgeAction(response: Response, allowed: number[]): Promise<Finding | null> {
	const text = await response.text();
	let body: { type?: string; status?: number; data?: string; error?: unknown };
	try {
		body = JSON.parse(text);
	} catch {
		return { kind: `${response.status}, not JSON`, detail: text.slice(0, 300) };
	}
	if (body.type === 'failure') {
		if (!allowed.includes(body.status ?? 0)) return { kind: `failure ${body.status}`, detail: text.slice(0, 300) };
		let data: unknown;
		try {
			data = devalueParse(body.data ?? '');
		} catch {
			return { kind: `failure ${body.status}, data not devalue`, detail: text.slice(0, 300) };
		}
		const shape = errorShape(data);
		return shape ? { kind: `failure ${body.status} ${shape}`, detail: text.slice(0, 300) } : null;
	}
	if (body.type === 'error' && allowed.includes(response.status)) {
		const shape = errorShape(body.error);
		return shape ? { kind: `error ${response.status} ${shape}`, detail: text.slice(0, 300) } : null;
	}
	return { kind: `${body.type ?? 'untyped'} ${response.status}`, detail: text.slice(0, 300) };
}

// ------------------------------------------------------------------------------------------------ the runner

const timings: string[] = [];

/**
 * Runs `send` for RUNS generated inputs, one request at a time, and collects wrong answers by kind with the
 * smallest input that produced each (shrinking over HTTP would take longer than the whole suite). The database and
 * the events table must be as before.
 */
async function hostileProperty<T>(
	label: string,
	inputs: fc.Arbitrary<T>,
	send: (input: T) => Promise<Finding | null>,
	show: (input: T) => string
): Promise<void> {
	const before = await snapshot(databaseUrl);
	const found = new Map<string, { detail: string; example: string; count: number }>();
	const started = performance.now();
	// fc.check, not fc.assert: the property never throws (wrong answers are collected above), and its seed is wanted.
	const details = await fc.check(
		fc.asyncProperty(inputs, async (input) => {
			let finding: Finding | null;
			try {
				finding = await send(input);
			} catch (e) {
				finding = { kind: `request failed: ${(e as Error).message}`, detail: String((e as Error).cause ?? '') };
			}
			if (finding) {
				const example = show(input);
				const seen = found.get(finding.kind);
				if (!seen) found.set(finding.kind, { detail: finding.detail, example, count: 1 });
				else {
					seen.count++;
					if (example.length < seen.example.length) Object.assign(seen, { example, detail: finding.detail });
				}
			}
			return true;
		}),
		// HOSTILE_SEED replays a run (fast-check prints the seed it used when a property fails).
		{ numRuns: RUNS, seed: process.env.HOSTILE_SEED ? Number(process.env.HOSTILE_SEED) : undefined }
	);
	const elapsed = performance.now() - started;
	timings.push(
		`${label}: ${RUNS} runs in ${(elapsed / 1000).toFixed(1)} s (${(elapsed / RUNS).toFixed(1)} ms each), seed ${details.seed}`
	);
	expect(details.numRuns, `${label}: runs`).toBe(RUNS);
	console.log(timings[timings.length - 1]);
	const after = await snapshot(databaseUrl);
	const report = [...found].map(
		([kind, { detail, example, count }]) =>
			`${count}× ${kind}\n    smallest body: ${example.slice(0, 400)}\n    answer: ${detail.slice(0, 300)}`
	);
	// One assertion for both, so a failure shows the wrong answers and the rows written together.
	expect({ written: changes(before, after), wrongAnswers: report }, label).toEqual({ written: [], wrongAnswers: [] });
}

const excerpt = (text: string) =>
	JSON.stringify(text.length > 300 ? `${text.slice(0, 200)}…(${text.length} chars)…${text.slice(-60)}` : text);

function showForm(body: FormBody): string {
	const parts = body.pairs.map(([k, v]) =>
		typeof v === 'string' ? `${excerpt(k)}=${excerpt(v)}` : `${excerpt(k)}=file(${excerpt(v.name)}, ${excerpt(v.file)})`
	);
	return `${body.multipart ? 'multipart' : 'urlencoded'} ${parts.join(' & ')}`;
}

function apiHeaders(extra: Record<string, string> = {}): Record<string, string> {
	return { origin, cookie: cookies.lead, accept: 'application/json', ...extra };
}

function actionHeaders(cookie: string, extra: Record<string, string> = {}): Record<string, string> {
	return { origin, cookie, accept: 'application/json', 'x-sveltekit-action': 'true', ...extra };
}

const cookieFor = (routeId: string) => (routeId === '/signin' ? '' : cookies.manager);

// ------------------------------------------------------------------------------------------------ setup

beforeAll(async () => {
	if (!existsSync(join(process.cwd(), 'build', 'index.js')))
		throw new Error('no build/: run `npx vite build` first (these tests run against the built app)');
	databaseUrl = await createScratch(DATABASE);
	knexCli(['migrate:latest'], databaseUrl);
	knexCli(['seed:run'], databaseUrl);
	[instance] = await startInstances([PORT], { DATABASE_URL: databaseUrl });
	origin = instance.url;
	cookies.manager = await signIn(origin, account('manager').email, account('manager').password);
	cookies.lead = await signIn(origin, account('lead').email, account('lead').password);
	facts = await readFacts();
});

afterAll(async () => {
	console.log(`time per endpoint:\n  ${timings.join('\n  ')}`);
	if (instance) await stopInstances([instance]);
	await dropScratch(DATABASE);
});

test('every mutating API method and form action has a hostile-input case', () => {
	const json = jsonFields();
	const known = new Set([
		...Object.keys(json),
		'POST /api/wheels/[id=id]/photos',
		'DELETE /api/bays/[code=code]/claim'
	]);
	for (const t of apiTargets) expect(known.has(t.key), `${t.key} has no body description here`).toBe(true);
	// Facts are read in beforeAll; the form table only reads them when a body is generated.
	const forms = formFields();
	for (const t of actionTargets) expect(forms[t.key], `${t.key} has no field description here`).toBeDefined();
	expect(apiTargets.length).toBeGreaterThan(5);
	expect(actionTargets.length).toBeGreaterThan(10);
});

// ------------------------------------------------------------------------------------------------ 1. hostile input

describe('hostile input: only 400/413/415/422 with { code, message, issues }, nothing stored', () => {
	for (const target of apiTargets) {
		test(`${target.key}`, async () => {
			if (target.key === 'POST /api/wheels/[id=id]/photos') return photoProperty(target);
			if (target.key === 'DELETE /api/bays/[code=code]/claim') return releaseProperty(target);
			const fields = jsonFields()[target.key];
			const allowed = target.key === 'POST /api/bays/[code=code]/claim' ? REFUSED_OR_SLOWED : REFUSED;
			await hostileProperty(
				target.key,
				jsonBodies(fields, exclusive[target.key]),
				async ({ text, contentType }) => {
					const response = await fetch(`${origin}${target.url}`, {
						signal: AbortSignal.timeout(60_000),
						method: target.method,
						headers: apiHeaders({ 'content-type': contentType }),
						body: text
					});
					return judgeApi(response, allowed);
				},
				({ text, contentType }) => `${contentType} ${excerpt(text)}`
			);
		});
	}

	for (const target of actionTargets) {
		test(`POST ${target.url} (${target.key})`, async () => {
			const spec = formFields()[target.key];
			await hostileProperty(
				target.key,
				formBodies(spec.fields, { files: spec.files }),
				async (body) => {
					const response = await fetch(`${origin}${target.url}`, {
						signal: AbortSignal.timeout(60_000),
						method: 'POST',
						headers: actionHeaders(cookieFor(target.routeId)),
						body: encodeForm(body),
						redirect: 'manual'
					});
					if (target.routeId === '/signin' && sessionCookie(response))
						return { kind: 'signed in', detail: String(response.status) };
					return judgeAction(response, spec.allow ?? REFUSED);
				},
				showForm
			);
		});
	}
});

/** The photo upload takes multipart: hostile parts, never a picture (415/400), or another content type (415). */
async function photoProperty(target: ApiTarget) {
	const bodies = fc.oneof(
		{
			weight: 4,
			arbitrary: formBodies({
				photo: { plausible: () => 'not a file' },
				kind: {
					plausible: () => 'damage',
					breaker: hostileString.filter((s) => !['damage', 'finished', 'work'].includes(s))
				}
			}).map((b) => ({ ...b, multipart: true }))
		},
		{
			weight: 1,
			arbitrary: jsonBodies({}).map((b) => ({ multipart: false, pairs: [['json', b.text]] as [string, FormValue][] }))
		}
	);
	await hostileProperty(
		target.key,
		bodies,
		async (body) => {
			const response = await fetch(`${origin}${target.url}`, {
				signal: AbortSignal.timeout(60_000),
				method: 'POST',
				headers: apiHeaders(body.multipart ? {} : { 'content-type': 'application/json' }),
				body: body.multipart ? encodeForm(body) : String(body.pairs[0][1])
			});
			return judgeApi(response, REFUSED);
		},
		showForm
	);
}

/**
 * Ending a bay claim reads no body: any body is ignored and the answer is 204 (nothing to release) or, with a claim
 * token that names no claim, 401 `claim_ended` from the hook. Hostile bodies and tokens must not change that, nor
 * write anything.
 */
async function releaseProperty(target: ApiTarget) {
	const token = fc.option(fc.stringMatching(/^[\x21-\x7e]{1,200}$/), { nil: undefined });
	await hostileProperty(
		target.key,
		fc.record({ body: jsonBodies(jsonFields()['POST /api/bays/[code=code]/claim']), token }),
		async ({ body, token }) => {
			const response = await fetch(`${origin}${target.url}`, {
				signal: AbortSignal.timeout(60_000),
				method: 'DELETE',
				headers: apiHeaders({ 'content-type': body.contentType, ...(token ? { 'x-lugline-claim': token } : {}) }),
				body: body.text
			});
			if (!token) {
				await response.arrayBuffer();
				return response.status === 204 ? null : { kind: `${response.status} without a token`, detail: '' };
			}
			return judgeApi(response, [401]);
		},
		({ body, token }) => `token ${excerpt(token ?? '(none)')} ${excerpt(body.text)}`
	);
}

function sessionCookie(response: Response): boolean {
	return response.headers.getSetCookie().some((c) => /^authjs\.session-token=[^;]/.test(c));
}

// ------------------------------------------------------------------------------------------------ 2. oversized

const MiB = 1024 * 1024;
const BODY_SIZE_LIMIT = 10 * MiB + 64 * 1024;

const s3 = new S3Client({
	endpoint: testS3.endpoint,
	region: testS3.region,
	forcePathStyle: true,
	credentials: { accessKeyId: testS3.accessKeyId, secretAccessKey: testS3.secretAccessKey }
});

async function objectCount(): Promise<number> {
	let count = 0;
	let token: string | undefined;
	do {
		const page = await s3.send(new ListObjectsV2Command({ Bucket: testS3.bucket, ContinuationToken: token }));
		count += page.KeyCount ?? 0;
		token = page.IsTruncated ? page.NextContinuationToken : undefined;
	} while (token);
	return count;
}

function chunked(bytes: Uint8Array, size = 256 * 1024): ReadableStream<Uint8Array> {
	let offset = 0;
	return new ReadableStream({
		pull(controller) {
			if (offset >= bytes.length) return controller.close();
			controller.enqueue(bytes.subarray(offset, offset + size));
			offset += size;
		}
	});
}

/** A multipart body by hand, so it can go out with a Content-Length or chunked. */
function multipart(
	field: string,
	fileName: string,
	type: string,
	content: Uint8Array,
	more: Record<string, string> = {}
) {
	const boundary = `----hostile${Date.now()}`;
	const head =
		Object.entries(more)
			.map(([k, v]) => `--${boundary}\r\ncontent-disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`)
			.join('') +
		`--${boundary}\r\ncontent-disposition: form-data; name="${field}"; filename="${fileName}"\r\ncontent-type: ${type}\r\n\r\n`;
	const tail = `\r\n--${boundary}--\r\n`;
	const enc = new TextEncoder();
	const bytes = Buffer.concat([enc.encode(head), content, enc.encode(tail)]);
	return { bytes, contentType: `multipart/form-data; boundary=${boundary}` };
}

/** A valid job whose notes make the body `size` bytes. */
function bigJob(size: number): Uint8Array {
	const base = JSON.stringify({
		customer: { name: 'Invented Oversize Customer' },
		kind: 'waiter',
		promisedAt: future(),
		services: ['mount-balance'],
		notes: ''
	});
	return new TextEncoder().encode(base.replace('"notes":""', `"notes":"${'n'.repeat(size - base.length)}"`));
}

interface Sent {
	status: number;
	text: string;
	error?: string;
}

async function send(url: string, method: string, headers: Record<string, string>, bytes: Uint8Array, stream: boolean) {
	try {
		const response = await fetch(url, {
			method,
			headers,
			signal: AbortSignal.timeout(120_000),
			body: stream ? chunked(bytes) : bytes,
			...(stream ? { duplex: 'half' } : {})
		} as RequestInit);
		return { status: response.status, text: await response.text() } as Sent;
	} catch (e) {
		// The server may answer 413 and close before the whole body is sent; the client then sees the socket close.
		return { status: 0, text: '', error: `${(e as Error).message}: ${String((e as Error).cause ?? '')}` } as Sent;
	}
}

describe('oversized bodies: 413, nothing stored', () => {
	// Over the 1 MiB JSON limit (well under BODY_SIZE_LIMIT): a body each JSON route would otherwise read and check.
	test('over 1 MiB to every JSON route → 413 { code, message, issues }', async () => {
		const before = await snapshot(databaseUrl);
		const wrong: string[] = [];
		for (const target of apiTargets) {
			if (target.key === 'POST /api/wheels/[id=id]/photos' || target.method === 'DELETE') continue;
			const pairs = validPairs(target);
			const big = 'n'.repeat(MiB + 4096);
			const notes = pairs.find(([k]) => k === 'notes');
			if (notes) notes[1] = big;
			else pairs.push(['notes', big]);
			const response = await fetch(`${origin}${target.url}`, {
				signal: AbortSignal.timeout(60_000),
				method: target.method,
				headers: apiHeaders({ 'content-type': 'application/json' }),
				body: jsonText(obj(pairs))
			});
			const finding = await judgeApi(response, [413]);
			if (finding) wrong.push(`${target.key}: ${finding.kind} ${finding.detail.slice(0, 120)}`);
		}
		expect({ written: changes(before, await snapshot(databaseUrl)), wrong }).toEqual({ written: [], wrong: [] });
	});

	test('over BODY_SIZE_LIMIT, declared and chunked, to a JSON route, the photo upload and the CSV import → 413', async () => {
		const before = await snapshot(databaseUrl);
		const objectsBefore = await objectCount();
		const size = BODY_SIZE_LIMIT + 256 * 1024;
		// A JPEG signature then padding: past the limit, nothing of it may reach the decoder or storage.
		const jpeg = new Uint8Array(size);
		jpeg.set([0xff, 0xd8, 0xff, 0xe0]);
		const photo = multipart('photo', 'big.jpg', 'image/jpeg', jpeg, { kind: 'damage' });
		const header = new TextEncoder().encode(`make,model,trim,year_from,year_to\n`);
		const csvBytes = new Uint8Array(size);
		csvBytes.fill(0x61);
		csvBytes.set(header);
		const csv = multipart('file', 'big.csv', 'text/csv', csvBytes);
		const cases = [
			{ name: 'POST /api/jobs', url: '/api/jobs', type: 'application/json', bytes: bigJob(size), action: false },
			{
				name: 'POST /api/wheels/1/photos',
				url: '/api/wheels/1/photos',
				type: photo.contentType,
				bytes: photo.bytes,
				action: false
			},
			{
				name: 'POST /manage/vehicles/import?/preview',
				url: '/manage/vehicles/import?/preview',
				type: csv.contentType,
				bytes: csv.bytes,
				action: true
			}
		];
		const wrong: string[] = [];
		for (const c of cases) {
			for (const stream of [false, true]) {
				const headers = c.action
					? actionHeaders(cookies.manager, { 'content-type': c.type })
					: apiHeaders({ 'content-type': c.type });
				const sent = await send(`${origin}${c.url}`, 'POST', headers, c.bytes, stream);
				const how = stream ? 'chunked' : 'with Content-Length';
				let status = sent.status;
				if (c.action && sent.status === 200) {
					try {
						status = JSON.parse(sent.text).status;
					} catch {
						// not the action envelope; judged by the HTTP status
					}
				}
				if (status !== 413) wrong.push(`${c.name} ${how}: ${sent.status} ${sent.error ?? sent.text.slice(0, 160)}`);
			}
		}
		expect({
			written: changes(before, await snapshot(databaseUrl)),
			objects: (await objectCount()) - objectsBefore,
			wrong
		}).toEqual({ written: [], objects: 0, wrong: [] });
	});
});

// ------------------------------------------------------------------------------------------------ 3. cross-site

/** A body each route would accept from its own screens: a refusal then comes from the origin or content check. */
function validApiBody(target: ApiTarget): string | Uint8Array {
	switch (target.key) {
		case 'POST /api/bays/[code=code]/claim':
			// The first technician's demo PIN (seeds/01-demo.ts).
			return JSON.stringify({ userId: facts.techId, pin: '1111' });
		case 'POST /api/jobs/[id=id]/summary':
			return '{}';
		case 'DELETE /api/bays/[code=code]/claim':
			return '';
		case 'POST /api/wheels/[id=id]/photos':
			return onePixelUpload;
		default:
			return jsonText(obj(validPairs(target)));
	}
}

/** The plausible value of every field, less those that exclude each other: a body the route would accept. */
function validPairs(target: ApiTarget): [string, Json][] {
	const fields = jsonFields()[target.key] ?? {};
	return Object.entries(fields)
		.filter(([k]) => !(exclusive[target.key] ?? []).includes(k))
		.map(([k, f]) => [k, f.plausible()]);
}

/** A 1×1 PNG as a multipart upload with the boundary `x`, as a camera screen would send it. */
const onePixelUpload = Buffer.concat([
	Buffer.from(
		'--x\r\ncontent-disposition: form-data; name="photo"; filename="p.png"\r\ncontent-type: image/png\r\n\r\n'
	),
	Buffer.from(
		'iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==',
		'base64'
	),
	Buffer.from('\r\n--x--\r\n')
]);

function validForm(target: ActionTarget): FormData | URLSearchParams {
	if (target.routeId === '/signin') {
		const manager = account('manager');
		return new URLSearchParams({ email: manager.email, password: manager.password });
	}
	const spec = formFields()[target.key];
	if (spec.files === false) {
		const form = new FormData();
		form.append('file', new Blob(['make,model\n'], { type: 'text/csv' }), 'vehicles.csv');
		return form;
	}
	return new URLSearchParams(Object.entries(spec.fields).map(([k, f]) => [k, f.plausible()]));
}

interface Attempt {
	label: string;
	origin?: string;
	contentType?: string;
	expect: number[];
	text?: boolean;
}

describe('cross-site requests and wrong content types are refused, nothing changed', () => {
	test('every mutating API route', async () => {
		const wrong: string[] = [];
		const before = await snapshot(databaseUrl);
		for (const target of apiTargets) {
			const photo = target.key === 'POST /api/wheels/[id=id]/photos';
			const body = validApiBody(target);
			const own = photo ? 'multipart/form-data; boundary=x' : 'application/json';
			const attempts: Attempt[] = [
				{ label: 'foreign Origin', origin: FOREIGN, contentType: own, expect: [403] },
				{ label: 'no Origin', contentType: own, expect: [403] },
				{ label: 'text/plain, foreign Origin', origin: FOREIGN, contentType: 'text/plain', expect: [403] },
				{ label: 'text/plain, no Origin', contentType: 'text/plain', expect: [403] }
			];
			// Ending a claim reads no body, so its content type says nothing; the others take only their own type.
			if (target.method !== 'DELETE')
				for (const type of ['text/plain', 'application/x-www-form-urlencoded', 'multipart/form-data; boundary=x'])
					if (!(photo && type.startsWith('multipart')))
						attempts.push({ label: `${type}, own Origin`, origin, contentType: type, expect: [415] });
			for (const a of attempts) {
				const response = await fetch(`${origin}${target.url}`, {
					signal: AbortSignal.timeout(60_000),
					method: target.method,
					headers: {
						cookie: cookies.lead,
						accept: 'application/json',
						...(a.origin ? { origin: a.origin } : {}),
						...(a.contentType ? { 'content-type': a.contentType } : {})
					},
					body: body.length ? (body as BodyInit) : undefined
				}).catch((e: Error) => e);
				if (response instanceof Error) {
					wrong.push(`${target.key} (${a.label}): request failed: ${String(response.cause ?? response.message)}`);
					continue;
				}
				// An origin refusal is `cross_origin`; an accepted event stream is cut off by judgeApi.
				const finding = await judgeApi(response, a.expect, a.expect[0] === 403 ? 'cross_origin' : undefined);
				if (finding) wrong.push(`${target.key} (${a.label}): ${finding.kind} ${finding.detail.slice(0, 120)}`);
			}
		}
		const written = changes(before, await snapshot(databaseUrl));
		expect({ written, wrong }).toEqual({ written: [], wrong: [] });
	});

	test('every form action, sign-in included', async () => {
		const wrong: string[] = [];
		const before = await snapshot(databaseUrl);
		for (const target of actionTargets) {
			const attempts: Attempt[] = [
				{ label: 'foreign Origin', origin: FOREIGN, expect: [403] },
				{ label: 'no Origin', expect: [403] },
				{ label: 'text/plain, foreign Origin', origin: FOREIGN, contentType: 'text/plain', expect: [403], text: true },
				{ label: 'text/plain, no Origin', contentType: 'text/plain', expect: [403], text: true },
				// Same origin but not a form encoding: a script's text/plain post is no form submission.
				{ label: 'text/plain, own Origin', origin, contentType: 'text/plain', expect: [400, 415], text: true }
			];
			for (const a of attempts) {
				const form = validForm(target);
				const body = a.text ? (form instanceof URLSearchParams ? form.toString() : 'file=make,model') : form;
				const response = await fetch(`${origin}${target.url}`, {
					signal: AbortSignal.timeout(60_000),
					method: 'POST',
					headers: {
						accept: 'application/json',
						'x-sveltekit-action': 'true',
						...(cookieFor(target.routeId) ? { cookie: cookieFor(target.routeId) } : {}),
						...(a.origin ? { origin: a.origin } : {}),
						...(a.contentType ? { 'content-type': a.contentType } : {})
					},
					body,
					redirect: 'manual'
				}).catch((e: Error) => e);
				const label = `${target.key} (${a.label})`;
				if (response instanceof Error) {
					wrong.push(`${label}: request failed: ${String(response.cause ?? response.message)}`);
					continue;
				}
				// Only sign-in would start a session; elsewhere Auth.js may refresh the manager's own cookie.
				if (target.routeId === '/signin' && sessionCookie(response)) wrong.push(`${label}: a session cookie was set`);
				const text = await response.text();
				let status = response.status;
				let parsed: { type?: string; status?: number; code?: string } | undefined;
				try {
					parsed = JSON.parse(text);
				} catch {
					// SvelteKit's own origin refusal is plain text unless accept is exactly application/json
				}
				if (parsed?.type === 'failure') status = parsed.status ?? 0;
				if (!a.expect.includes(status)) wrong.push(`${label}: ${response.status} ${text.slice(0, 160)}`);
				else if (status === 403 && parsed?.code !== 'cross_origin')
					wrong.push(`${label}: 403 without code cross_origin: ${text.slice(0, 120)}`);
			}
		}
		const written = changes(before, await snapshot(databaseUrl));
		expect({ written, wrong }).toEqual({ written: [], wrong: [] });
	});
});

// Last but one: the connections it leaves behind are reset, which would disturb the tests after it.
describe('a large body of the wrong type', () => {
	// A route that refuses a content type before reading the body must still answer: the client is told 415, not
	// left with a reset connection. Found by the hostile-input properties (several 10 KB emoji fields, URL-encoded,
	// to the CSV import); a 200 KB URL-encoded body reset about one request in four there.
	test('is answered 415 by the CSV import, the photo upload and a JSON route, ten times each', async () => {
		const body = new URLSearchParams({ file: 'x'.repeat(256 * 1024), photo: 'y', notes: 'z' }).toString();
		const cases = [
			{ url: '/manage/vehicles/import?/preview', headers: actionHeaders(cookies.manager) },
			{ url: '/manage/vehicles/import?/import', headers: actionHeaders(cookies.manager) },
			{ url: '/api/wheels/1/photos', headers: apiHeaders() },
			{ url: '/api/jobs', headers: apiHeaders() }
		];
		const before = await snapshot(databaseUrl);
		const wrong: string[] = [];
		for (const c of cases) {
			for (let n = 0; n < 10; n++) {
				const sent = await send(
					`${origin}${c.url}`,
					'POST',
					{ ...c.headers, 'content-type': 'application/x-www-form-urlencoded' },
					new TextEncoder().encode(body),
					false
				);
				let status = sent.status;
				try {
					const parsed = JSON.parse(sent.text) as { type?: string; status?: number };
					if (parsed.type === 'failure') status = parsed.status ?? 0;
				} catch {
					// judged by the HTTP status
				}
				if (status !== 415) wrong.push(`${c.url} #${n + 1}: ${sent.status} ${sent.error ?? sent.text.slice(0, 120)}`);
			}
		}
		expect({ written: changes(before, await snapshot(databaseUrl)), wrong }).toEqual({ written: [], wrong: [] });
	});
});

test('the instance is still up after all of it', async () => {
	expect(instance.process.exitCode, 'the instance exited').toBeNull();
	// A pooled connection the test before left reset can fail once; the instance itself must answer.
	let status = 0;
	for (let attempt = 0; attempt < 3 && status !== 200; attempt++)
		status = await fetch(`${origin}/api/health`).then(
			(r) => r.status,
			() => 0
		);
	expect(status).toBe(200);
});

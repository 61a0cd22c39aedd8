// The vehicle data's import, export and edit through the built app: the import page's form actions as the page posts
// them (multipart, use:enhance's JSON answer), the export routes, the edit action. Files are generated here from
// invented rows under a make of this test's own, which it deletes again (the vehicle table is shared by every store
// and other tests count it).
import { createHash } from 'node:crypto';
import * as devalue from 'devalue';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../support/database';
import { client, signIn, startInstances, stopInstances, type Instance } from '../support/instances';
import { createTestStore, newJob, type TestStore } from '../support/store';
import { vehicleColumns, type VehicleColumn } from '../../src/lib/schemas/vehicles';

const columns = vehicleColumns;
type Row = Record<VehicleColumn, string>;

/** An invented make no real maker uses, unique to this run. */
const MAKE = `Zzimport${process.pid}`;
const FAULT = `lugline_test_import_fault_${process.pid}`;

let instance: Instance;
let store: TestStore;
const cookies: Record<'manager' | 'tech' | 'writer' | 'lead', string> = { manager: '', tech: '', writer: '', lead: '' };

/** `count` invented rows of MAKE (models `<prefix> 00001` …), the way a spreadsheet would hold them. */
function generate(count: number, prefix = 'Model'): Row[] {
	return Array.from({ length: count }, (_, i) => ({
		make: MAKE,
		model: `${prefix} ${String(i + 1).padStart(5, '0')}`,
		trim: ['', 'GL', 'Sport'][i % 3],
		year_from: String(2000 + (i % 20)),
		year_to: String(2004 + (i % 20)),
		stud_count: String(4 + (i % 3)),
		bolt_circle_mm: ['100', '108', '114.3'][i % 3],
		centre_bore_mm: ['56.1', '63.4', '64.1'][i % 3],
		thread: ['M12x1.5', 'M14x1.5', '1/2-20'][i % 3],
		hex_mm: ['17', '19', '21'][i % 3],
		torque_nm: String(80 + (i % 60)),
		tire_front: '215/55R17 94V',
		tire_rear: i % 7 === 0 ? '235/50R17 96V' : '215/55R17 94V',
		placard_front_kpa: String(220 + (i % 5) * 10),
		placard_rear_kpa: '220',
		tpms: ['direct', 'indirect', 'none'][i % 3],
		notes: i % 11 === 0 ? 'Invented note, with a comma and "quotes"' : '',
		source: 'Invented test data - not for service use'
	}));
}

function csv(rows: Row[], { delimiter = ',', eol = '\n', bom = false } = {}): Uint8Array {
	const cell = (v: string) => (/[",;\r\n]/.test(v) ? `"${v.replaceAll('"', '""')}"` : v);
	const lines = [columns.join(delimiter), ...rows.map((r) => columns.map((c) => cell(r[c])).join(delimiter))];
	return new TextEncoder().encode((bom ? '\uFEFF' : '') + lines.join(eol) + eol);
}

const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

interface ActionAnswer {
	/** HTTP status: 200 for any answer of the action itself, 403 when the hook refused. */
	status: number;
	type?: 'success' | 'failure' | 'error' | 'redirect';
	/** The action's own status (fail(…)'s). */
	actionStatus?: number;
	data?: any;
}

/** Posts a form action the way the page's use:enhance does and decodes SvelteKit's answer. */
async function action(cookie: string, path: string, form: FormData): Promise<ActionAnswer> {
	const response = await fetch(`${instance.url}${path}`, {
		method: 'POST',
		headers: { origin: instance.url, cookie, accept: 'application/json', 'x-sveltekit-action': 'true' },
		body: form
	});
	const text = await response.text();
	if (!(response.headers.get('content-type') ?? '').includes('application/json')) return { status: response.status };
	const body = JSON.parse(text);
	return {
		status: response.status,
		type: body.type,
		actionStatus: body.status,
		data: body.data ? devalue.parse(body.data) : undefined
	};
}

function upload(bytes: Uint8Array, fields: Record<string, string> = {}, name = 'vehicles.csv'): FormData {
	const form = new FormData();
	form.set('file', new Blob([bytes as BlobPart], { type: 'text/csv' }), name);
	for (const [k, v] of Object.entries(fields)) form.set(k, v);
	return form;
}

const preview = (bytes: Uint8Array, cookie = cookies.manager) =>
	action(cookie, '/manage/vehicles/import?/preview', upload(bytes));
const confirm = (bytes: Uint8Array, token: string, cookie = cookies.manager) =>
	action(cookie, '/manage/vehicles/import?/import', upload(bytes, { token }));

const ours = (where = '') =>
	withClient(async (c) => {
		const { rows } = await c.query(
			`SELECT id, model, "trim", torque_nm, notes, version, updated_at FROM vehicles WHERE make = $1 ${where} ORDER BY model`,
			[MAKE]
		);
		return rows;
	});

async function cleanUp() {
	await withClient(async (c) => {
		await c.query(`ALTER TABLE vehicles DROP CONSTRAINT IF EXISTS ${FAULT}`);
		await c.query('DELETE FROM vehicles WHERE make = $1', [MAKE]);
	});
}

beforeAll(async () => {
	await cleanUp();
	store = await createTestStore(`vehicle-import-${process.pid}`);
	[instance] = await startInstances([3231]);
	for (const role of ['manager', 'tech', 'writer', 'lead'] as const)
		cookies[role] = await signIn(instance.url, store.people[role].email, store.people[role].password);
}, 60_000);

afterAll(async () => {
	if (instance) await stopInstances([instance]);
	await cleanUp();
});

describe('importing vehicle data', () => {
	const clean = generate(5000);
	const cleanFile = csv(clean);

	it('refuses a 5,000-row file with one bad row: nothing is imported and the row is named', async () => {
		const rows = generate(5000);
		rows[3126].stud_count = '12'; // line 3128: the header is line 1
		const file = csv(rows);

		const seen = await preview(file);
		expect(seen.type).toBe('success');
		const p = seen.data.preview;
		expect(p.rowCount).toBe(5000);
		expect(p.issueCount).toBe(1);
		expect(p.issues).toEqual([
			{
				line: 3128,
				column: 'stud_count',
				reason: 'Stud count must be the number of studs or bolts from 3 to 10; got "12".'
			}
		]);
		expect(p.added).toBe(4999);
		expect(p.token).toBe('');

		// Confirming anyway (a token for the file as if its preview had been clean) still imports nothing.
		const forced = await confirm(file, `${sha256(file)}.5000.0.0`);
		expect(forced.type).toBe('failure');
		expect(forced.actionStatus).toBe(400);
		expect(forced.data.message).toMatch(/Nothing was imported/);
		expect(forced.data.preview.issues[0]).toMatchObject({ line: 3128, column: 'stud_count' });
		expect(await ours()).toEqual([]);
	});

	it('imports a clean file, and the same file again changes nothing', async () => {
		const seen = await preview(cleanFile);
		expect(seen.data.preview).toMatchObject({ rowCount: 5000, issueCount: 0, added: 5000, changed: 0, unchanged: 0 });
		const token = seen.data.preview.token;
		expect(token).toBe(`${sha256(cleanFile)}.5000.0.0`);

		const done = await confirm(cleanFile, token);
		expect(done.type, JSON.stringify(done.data)).toBe('success');
		expect(done.data.imported).toMatchObject({ added: 5000, changed: 0, unchanged: 0 });
		const stored = await ours();
		expect(stored).toHaveLength(5000);
		expect(stored.every((r) => r.version === 1)).toBe(true);
		expect(stored.find((r) => r.model === 'Model 00012')).toMatchObject({
			trim: 'Sport',
			notes: 'Invented note, with a comma and "quotes"',
			torque_nm: '91.0'
		});

		const again = await preview(cleanFile);
		expect(again.data.preview).toMatchObject({ added: 0, changed: 0, unchanged: 5000, issueCount: 0, token: '' });
		// Confirmed anyway (the page offers no button for it), the import writes nothing and bumps no version.
		const twice = await confirm(cleanFile, `${sha256(cleanFile)}.0.0.5000`);
		expect(twice.data.imported).toMatchObject({ added: 0, changed: 0, unchanged: 5000 });
		expect(await ours()).toEqual(stored);
	});

	it('changes only the rows whose values differ, and lists the changed fields', async () => {
		const before = await ours();
		const edited = generate(5000);
		edited[9].torque_nm = '140';
		edited[4000].notes = 'Invented: wheel lock key in the glovebox';
		edited[4000].thread = 'm14 x 1.5'; // M14x1.5 in another spelling: not a change
		const file = csv(edited);

		const seen = await preview(file);
		const p = seen.data.preview;
		expect(p).toMatchObject({ added: 0, changed: 2, unchanged: 4998, changedFields: { torque_nm: 1, notes: 1 } });
		expect(p.changes).toEqual([
			{
				line: 11,
				id: expect.any(Number),
				label: expect.stringContaining('Model 00010'),
				fields: [{ column: 'torque_nm', from: 89, to: 140 }]
			},
			{
				line: 4002,
				id: expect.any(Number),
				label: expect.stringContaining('Model 04001'),
				fields: [{ column: 'notes', from: '', to: 'Invented: wheel lock key in the glovebox' }]
			}
		]);

		const done = await confirm(file, p.token);
		expect(done.data.imported).toMatchObject({ added: 0, changed: 2, unchanged: 4998 });
		const after = await ours();
		const changed = after.filter((r) => r.version !== 1).map((r) => [r.model, r.version]);
		expect(changed).toEqual([
			['Model 00010', 2],
			['Model 04001', 2]
		]);
		// The others were not written at all.
		const untouched = after.filter((r) => r.version === 1);
		expect(untouched).toEqual(before.filter((r) => !['Model 00010', 'Model 04001'].includes(r.model)));

		const audit = await withClient(
			async (c) =>
				(
					await c.query(
						`SELECT entity, entity_id, detail FROM audit WHERE store_id = $1 AND action = 'import' AND entity = 'vehicle'
						   AND entity_id = $2`,
						[store.id, p.changes[0].id]
					)
				).rows
		);
		expect(audit.map((a) => a.detail)).toContainEqual({ line: 11, changed: { torque_nm: [89, 140] } });
	});

	it('reads BOM, CRLF and semicolon-separated variants of a file as the same rows', async () => {
		const stored = generate(5000);
		stored[9].torque_nm = '140';
		stored[4000].notes = 'Invented: wheel lock key in the glovebox';
		for (const options of [
			{ bom: true },
			{ eol: '\r\n' },
			{ delimiter: ';' },
			{ delimiter: ';', eol: '\r\n', bom: true }
		]) {
			const seen = await preview(csv(stored, options));
			expect(seen.data.preview, JSON.stringify(options)).toMatchObject({
				rowCount: 5000,
				issueCount: 0,
				added: 0,
				changed: 0,
				unchanged: 5000,
				delimiter: options.delimiter ?? ','
			});
		}
	});

	it('imports nothing when a confirm does not match its preview', async () => {
		const first = csv(generate(3, 'Other'));
		const second = csv(generate(4, 'Other'));
		const token = (await preview(first)).data.preview.token;
		const wrongFile = await confirm(second, token);
		expect(wrongFile.actionStatus).toBe(409);
		expect(wrongFile.data.message).toMatch(/not the file you previewed/);
		expect(wrongFile.data.preview.added).toBe(4);

		// The data changed between the preview and the confirm: the new preview is shown instead.
		await confirm(second, (await preview(second)).data.preview.token);
		const stale = await confirm(first, token);
		expect(stale.actionStatus).toBe(409);
		expect(stale.data.message).toMatch(/changed since your preview/);
		expect(stale.data.preview).toMatchObject({ added: 0, unchanged: 3 });
		expect((await ours(`AND model LIKE 'Other%'`)).map((r) => r.model)).toEqual([
			'Other 00001',
			'Other 00002',
			'Other 00003',
			'Other 00004'
		]);
	});

	it('imports in one transaction: a row the database refuses in the last batch leaves nothing of the earlier ones', async () => {
		// Fault injection: a constraint only the 4,500th row breaks, so the first two batches of 2,000 are written
		// before the database refuses the third.
		const rows = generate(5000, 'Rollback');
		rows[4499].notes = FAULT;
		const file = csv(rows);
		const token = (await preview(file)).data.preview.token;
		expect(token).not.toBe('');
		await withClient((c) =>
			c.query(`ALTER TABLE vehicles ADD CONSTRAINT ${FAULT} CHECK (notes <> '${FAULT}') NOT VALID`)
		);
		try {
			const refused = await confirm(file, token);
			expect(refused.actionStatus).toBe(422);
			expect(refused.data.message).toMatch(new RegExp(`Nothing was imported.*${FAULT}`));
		} finally {
			await withClient((c) => c.query(`ALTER TABLE vehicles DROP CONSTRAINT IF EXISTS ${FAULT}`));
		}
		expect(await ours(`AND model LIKE 'Rollback%'`)).toEqual([]);
	});

	it('lets only managers import', async () => {
		const file = csv(generate(2, 'Forbidden'));
		for (const role of ['tech', 'writer'] as const) {
			expect((await preview(file, cookies[role])).status, role).toBe(403);
			expect((await confirm(file, `${sha256(file)}.2.0.0`, cookies[role])).status, role).toBe(403);
			const page = await fetch(`${instance.url}/manage/vehicles/import`, { headers: { cookie: cookies[role] } });
			expect(page.status, role).toBe(403);
		}
		expect(await ours(`AND model LIKE 'Forbidden%'`)).toEqual([]);
	});

	it('refuses a file over 10 MB with a message', async () => {
		const big = new Uint8Array(10 * 1024 * 1024 + 1024).fill(0x61);
		const answer = await preview(big);
		expect(answer.actionStatus).toBe(413);
		expect(answer.data.message).toMatch(/too large: at most 10 MB/);
	});
});

describe('exporting', () => {
	const formulas = ['=HYPERLINK("http://example.invalid/x","open")', '+1', '@x', '-cmd', '=1+2'];

	async function download(path: string, cookie = cookies.manager) {
		const response = await fetch(`${instance.url}${path}`, { headers: { cookie } });
		// Decoded by hand: Response.text() would drop the byte order mark this checks for.
		const text = new TextDecoder('utf-8', { ignoreBOM: true }).decode(await response.arrayBuffer());
		return { status: response.status, type: response.headers.get('content-type'), text };
	}

	it('escapes cells a spreadsheet would run, and the export imports back unchanged', async () => {
		const rows = generate(formulas.length, 'Formula').map((r, i) => ({ ...r, notes: formulas[i] }));
		const file = csv(rows);
		await confirm(file, (await preview(file)).data.preview.token);

		const exported = await download('/api/export/vehicles.csv');
		expect(exported.status).toBe(200);
		expect(exported.type).toMatch(/^text\/csv/);
		expect(exported.text.startsWith('\uFEFFmake,model,trim,year_from,year_to,stud_count,bolt_circle_mm')).toBe(true);
		expect(exported.text).not.toMatch(/[^\r]\n/); // every line ends with CRLF
		expect(exported.text).toContain(`"'=HYPERLINK(""http://example.invalid/x"",""open"")"`);

		const parsed = Papa.parse<Record<string, string>>(exported.text.slice(1), {
			header: true,
			skipEmptyLines: true,
			delimiter: ','
		});
		expect(parsed.errors).toEqual([]);
		const notes = parsed.data.filter((r) => r.make === MAKE && r.model.startsWith('Formula')).map((r) => r.notes);
		expect(notes).toEqual(formulas.map((f) => `'${f}`));
		for (const row of parsed.data) for (const cell of Object.values(row)) expect(cell).not.toMatch(/^[=+\-@\t\r]/);

		// The whole export read back: every row, the guarded ones included, matches what is stored.
		const back = await preview(new TextEncoder().encode(exported.text));
		expect(back.data.preview).toMatchObject({ issueCount: 0, added: 0, changed: 0, unchanged: parsed.data.length });
	});

	it('exports a store’s jobs and wheel records for a range of days, escaped the same way', async () => {
		const writer = client(instance.url, cookies.writer);
		const job = await writer.call('POST', '/api/jobs', newJob({ wheels: ['LF'], notes: '=1+2 invented note' }));
		expect(job.status, JSON.stringify(job.body)).toBe(201);
		const wheel = job.body.wheels[0];
		const record = await client(instance.url, cookies.lead).call('PUT', `/api/wheels/${wheel.id}/record`, {
			version: 0,
			treadDepthMm: 6.5,
			pressureSetKpa: 240,
			notes: '@x invented'
		});
		expect(record.status, JSON.stringify(record.body)).toBe(200);

		const today = new Date().toISOString().slice(0, 10);
		const range = `from=${new Date(Date.now() - 86_400_000).toISOString().slice(0, 10)}&to=${today}`;
		const jobs = await download(`/api/export/jobs.csv?${range}`);
		expect(jobs.status).toBe(200);
		const jobRows = Papa.parse<Record<string, string>>(jobs.text.slice(1), { header: true, skipEmptyLines: true }).data;
		expect(jobRows.find((r) => r.job_number === String(job.body.number))).toMatchObject({
			notes: "'=1+2 invented note",
			customer: 'Invented Test Customer',
			wheels: '1'
		});

		const records = await download(`/api/export/wheel-records.csv?${range}`);
		expect(records.status).toBe(200);
		const recordRows = Papa.parse<Record<string, string>>(records.text.slice(1), {
			header: true,
			skipEmptyLines: true
		}).data;
		expect(recordRows).toEqual([
			expect.objectContaining({
				job_number: String(job.body.number),
				wheel_position: 'LF',
				tread_depth_mm: '6.5',
				pressure_set_kpa: '240',
				notes: "'@x invented"
			})
		]);

		const noRange = await download('/api/export/jobs.csv');
		expect(noRange.status).toBe(400);
		expect(JSON.parse(noRange.text).message).toMatch(/YYYY-MM-DD/);
		for (const role of ['tech', 'writer'] as const) {
			expect((await download('/api/export/vehicles.csv', cookies[role])).status).toBe(403);
			expect((await download(`/api/export/jobs.csv?${range}`, cookies[role])).status).toBe(403);
		}
	});
});

describe('editing one record', () => {
	const values = (row: Record<string, unknown>) =>
		Object.fromEntries(columns.map((c) => [c, String(row[c] ?? '')])) as Record<string, string>;
	const save = (id: number, fields: Record<string, string>, cookie = cookies.manager) => {
		const form = new FormData();
		for (const [k, v] of Object.entries(fields)) form.set(k, v);
		return action(cookie, `/manage/vehicles/${id}?/save`, form);
	};

	it('saves with the version it showed, refuses a stale save with the current values, and checks every field', async () => {
		const [row] = await withClient(
			async (c) => (await c.query(`SELECT * FROM vehicles WHERE make = $1 AND model = 'Model 00020'`, [MAKE])).rows
		);
		const page = await fetch(`${instance.url}/manage/vehicles/${row.id}`, { headers: { cookie: cookies.manager } });
		expect(page.status).toBe(200);
		expect(await page.text()).toContain('Model 00020');

		const mine = { ...values(row), torque_nm: '125', version: String(row.version) };
		const saved = await save(row.id, mine);
		expect(saved.type, JSON.stringify(saved.data)).toBe('success');
		expect(saved.data).toEqual({ saved: row.version + 1, changed: true });

		const stale = await save(row.id, { ...mine, torque_nm: '130' });
		expect(stale.actionStatus).toBe(409);
		expect(stale.data.message).toMatch(/Someone else saved this record/);
		expect(stale.data.current).toMatchObject({ version: row.version + 1, torque_nm: 125 });

		const bad = await save(row.id, { ...mine, version: String(row.version + 1), stud_count: '12', thread: 'M12' });
		expect(bad.actionStatus).toBe(400);
		expect(bad.data.errors).toMatchObject({
			stud_count: expect.stringMatching(/3 to 10/),
			thread: expect.stringMatching(/M12x1.5/)
		});

		const clash = await save(row.id, {
			...mine,
			version: String(row.version + 1),
			model: 'Model 00021',
			trim: 'Sport',
			year_from: '2000',
			year_to: '2004'
		});
		// Model 00021 is stored with trim Sport and years 2000–2004 (generate(): i = 20)
		expect(clash.actionStatus).toBe(409);
		expect(clash.data.message).toMatch(/already has this make, model, trim and years/);

		const [after] = await ours(`AND id = ${Number(row.id)}`);
		expect(after).toMatchObject({ torque_nm: '125.0', version: row.version + 1 });
		const audit = await withClient(
			async (c) =>
				(
					await c.query(`SELECT detail FROM audit WHERE action = 'edit' AND entity = 'vehicle' AND entity_id = $1`, [
						row.id
					])
				).rows
		);
		expect(audit.map((a) => a.detail)).toEqual([{ changed: { torque_nm: [Number(row.torque_nm), 125] } }]);

		expect((await save(row.id, { ...mine, version: String(row.version + 1) }, cookies.tech)).status).toBe(403);
	});

	it('lists and searches records on the server', async () => {
		const page = await fetch(`${instance.url}/manage/vehicles?q=${MAKE}+2019`, {
			headers: { cookie: cookies.manager }
		});
		expect(page.status).toBe(200);
		const html = await page.text();
		// generate(): a record covers 2019 when 2000 + (i % 20) is 2015 … 2019, i.e. 5 of every 20 rows: 1,250 of 5,000.
		expect(html).toMatch(/1250 records/);
		const tech = await fetch(`${instance.url}/manage/vehicles`, { headers: { cookie: cookies.tech } });
		expect(tech.status).toBe(403);
	});
});

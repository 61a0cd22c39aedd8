// Reading an import file: the encodings, line ends and separators a spreadsheet produces, the header checks, and
// every problem reported with its line, column and reason. Nothing here touches the database.
import { readFileSync } from 'node:fs';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { vehicleColumns, type VehicleInput } from '$lib/schemas/vehicles';
import { MAX_IMPORT_BYTES, readVehicleCsv } from './vehicle-import';

/** Invented rows (no real vehicle), as the cells of the file. */
function rows(count: number): VehicleInput[] {
	return Array.from({ length: count }, (_, i) => ({
		make: 'Corvane',
		model: `Tessa ${i + 1}`,
		trim: i % 2 ? 'GL' : '',
		year_from: '2016',
		year_to: '2021',
		stud_count: '5',
		bolt_circle_mm: '114.3',
		centre_bore_mm: '64.1',
		thread: 'M12x1.5',
		hex_mm: '19',
		torque_nm: '110',
		tire_front: '215/55R17 94V',
		tire_rear: '215/55R17 94V',
		placard_front_kpa: '230',
		placard_rear_kpa: '220',
		tpms: 'direct',
		notes: i === 1 ? 'Locking nut, "key" in glovebox' : '',
		source: 'Invented test data'
	}));
}

const quote = (cell: string, delimiter: string) =>
	cell.includes('"') || cell.includes(delimiter) || /[\r\n]/.test(cell) ? `"${cell.replaceAll('"', '""')}"` : cell;

function file(
	data: VehicleInput[],
	{ delimiter = ',', eol = '\n', bom = false, columns = vehicleColumns as readonly string[] } = {}
): Uint8Array {
	const lines = [columns.join(delimiter)];
	for (const row of data)
		lines.push(columns.map((c) => quote(row[c as keyof VehicleInput] ?? '', delimiter)).join(delimiter));
	return new TextEncoder().encode((bom ? '\uFEFF' : '') + lines.join(eol) + eol);
}

const text = (t: string) => new TextEncoder().encode(t);

describe('readVehicleCsv', () => {
	it('reads a clean file into checked rows with their line numbers', () => {
		const result = readVehicleCsv(file(rows(3)));
		expect(result.issues).toEqual([]);
		expect(result.delimiter).toBe(',');
		expect(result.rowCount).toBe(3);
		expect(result.rows.map((r) => r.line)).toEqual([2, 3, 4]);
		expect(result.rows[1].data).toMatchObject({
			model: 'Tessa 2',
			torque_nm: 110,
			notes: 'Locking nut, "key" in glovebox'
		});
	});

	it('reads the same rows from a BOM, CRLF and semicolon-separated variant', () => {
		const plain = readVehicleCsv(file(rows(50)));
		const variants = [
			file(rows(50), { bom: true }),
			file(rows(50), { eol: '\r\n' }),
			file(rows(50), { delimiter: ';' }),
			file(rows(50), { delimiter: ';', eol: '\r\n', bom: true })
		];
		for (const variant of variants) {
			const read = readVehicleCsv(variant);
			expect(read.issues).toEqual([]);
			expect(read.rows).toEqual(plain.rows);
		}
		expect(readVehicleCsv(variants[2]).delimiter).toBe(';');
	});

	it('takes the separator from the header, not from a guess, and reads decimal commas in a semicolon file', () => {
		// One row with decimal commas: a separator guessed from the content could be the comma.
		const read = readVehicleCsv(
			text(
				`${vehicleColumns.join(';')}\r\nCorvane;Tessa;;2016;2021;5;114,3;64,1;M12x1,5;19;110,5;215/55R17;215/55R17;230;220;direct;;\r\n`
			)
		);
		expect(read.issues).toEqual([]);
		expect(read.rows[0].data).toMatchObject({
			bolt_circle_mm: 114.3,
			centre_bore_mm: 64.1,
			thread: 'M12x1.5',
			torque_nm: 110.5
		});
	});

	it('takes the columns in any order and ignores trailing empty columns a spreadsheet adds', () => {
		const reversed = [...vehicleColumns].reverse();
		const read = readVehicleCsv(file(rows(2), { columns: reversed }));
		expect(read.issues).toEqual([]);
		expect(read.rows).toEqual(readVehicleCsv(file(rows(2))).rows);
		const padded = new TextDecoder()
			.decode(file(rows(2)))
			.split('\n')
			.map((l) => (l ? `${l},,` : l))
			.join('\n');
		expect(readVehicleCsv(text(padded)).issues).toEqual([]);
	});

	it('counts lines as an editor does: blank lines skipped, a quoted line break inside a cell, blank rows of cells', () => {
		const header = vehicleColumns.join(',');
		const [a, b, c] = new TextDecoder()
			.decode(file(rows(3)))
			.split('\n')
			.slice(1);
		const withNote = b.replace('"Locking nut, ""key"" in glovebox"', '"two\r\nlines"');
		const body = [header, '', a, withNote, ',,,,,', '', c.replace('M12x1.5', 'M12')].join('\r\n');
		const read = readVehicleCsv(text(body));
		expect(read.rows.map((r) => r.line)).toEqual([3, 4]);
		expect(read.rows[1].data.notes).toBe('two\r\nlines');
		expect(read.rowCount).toBe(3);
		expect(read.issues).toEqual([{ line: 8, column: 'thread', reason: expect.stringMatching(/M12x1.5/) }]);
	});

	it('names every bad row with its line, column and reason', () => {
		const data = rows(6);
		data[1].stud_count = '12';
		data[3].placard_front_kpa = '35';
		data[3].tire_rear = 'nonsense';
		data[4].year_from = '2022';
		const read = readVehicleCsv(file(data));
		expect(read.rows).toHaveLength(3);
		expect(read.issues).toEqual(
			[
				{
					line: 3,
					column: 'stud_count',
					reason: 'Stud count must be the number of studs or bolts from 3 to 10; got "12".'
				},
				{ line: 5, column: 'tire_rear', reason: expect.stringMatching(/^OE size rear: /) },
				{ line: 5, column: 'placard_front_kpa', reason: expect.stringMatching(/If that is psi, it is 241.3 kPa/) },
				{ line: 6, column: 'year_to', reason: expect.stringMatching(/last model year is before the first/) }
			].sort(
				(x, y) =>
					x.line - y.line || vehicleColumns.indexOf(x.column as never) - vehicleColumns.indexOf(y.column as never)
			)
		);
	});

	it('refuses a row that repeats an earlier row’s make, model, trim and years', () => {
		const data = rows(3);
		data[2] = { ...data[0], torque_nm: '120' };
		const read = readVehicleCsv(file(data));
		expect(read.issues).toEqual([{ line: 4, column: 'make', reason: expect.stringMatching(/as line 2/) }]);
	});

	it('says what is wrong with a header', () => {
		const columns = vehicleColumns.map((c) => (c === 'torque_nm' ? 'torque_lbft' : c)).filter((c) => c !== 'hex_mm');
		const read = readVehicleCsv(file(rows(2), { columns: [...columns, 'make'] }));
		expect(read.rows).toEqual([]);
		expect(read.issues).toEqual([
			{
				line: 1,
				column: 'torque_lbft',
				reason: expect.stringMatching(/Unknown column "torque_lbft"\. Did you mean torque_nm \(in N·m\)\?/)
			},
			{ line: 1, column: 'make', reason: 'Column "make" appears twice in the header.' },
			{ line: 1, column: 'hex_mm', reason: expect.stringMatching(/Column "hex_mm" is missing/) },
			{ line: 1, column: 'torque_nm', reason: expect.stringMatching(/Column "torque_nm" is missing/) }
		]);
		expect(readVehicleCsv(text('just some text\n1 2 3\n')).issues[0]).toMatchObject({
			line: 1,
			reason: expect.stringMatching(/header/)
		});
		expect(readVehicleCsv(text('')).issues[0].reason).toMatch(/header/);
		expect(readVehicleCsv(text(vehicleColumns.join(',') + '\n')).issues).toEqual([
			{ line: 2, column: '', reason: 'The file has no vehicle rows below the header.' }
		]);
	});

	it('names a row with a cell too many or too few, and an unclosed quote', () => {
		const lines = new TextDecoder().decode(file(rows(3))).split('\n');
		lines[1] = lines[1].replace('Tessa 1', 'Tessa, 1');
		lines[2] = lines[2].replace(',Invented test data', '');
		lines[3] = lines[3].replace('Corvane', '"Corvane');
		const read = readVehicleCsv(text(lines.join('\n')));
		expect(read.issues).toEqual([
			{
				line: 2,
				column: '',
				reason: expect.stringMatching(/19 cells and the header 18: a cell whose text holds a comma/)
			},
			{ line: 3, column: '', reason: expect.stringMatching(/17 cells and the header 18/) },
			{ line: 4, column: '', reason: expect.stringMatching(/quoted cell is not closed/) }
		]);
	});

	it('finds the line of text that is not UTF-8', () => {
		const good = file(rows(3));
		const at = good.indexOf(0x0a, good.indexOf(0x0a) + 1) + 1; // the start of line 3
		const bad = new Uint8Array([...good.slice(0, at), 0xe9, ...good.slice(at)]); // é in Windows-1252
		expect(readVehicleCsv(bad).issues).toEqual([{ line: 3, column: '', reason: expect.stringMatching(/CSV UTF-8/) }]);
	});

	it('reads back what the export’s formula guard wrote', () => {
		const data = rows(2);
		data[0].notes = "'=1+2";
		data[1].notes = "'quoted'";
		const read = readVehicleCsv(file(data));
		expect(read.rows.map((r) => r.data.notes)).toEqual(['=1+2', "'quoted'"]);
	});

	it('refuses a file over the size limit', () => {
		const read = readVehicleCsv(new Uint8Array(MAX_IMPORT_BYTES + 1));
		expect(read.issues).toEqual([{ line: 0, column: '', reason: expect.stringMatching(/larger than 10 MB/) }]);
	});
});

describe('the example file in static/', () => {
	it('reads without a problem, every value already in the spelling Lugline stores', () => {
		const bytes = readFileSync('static/vehicle-data-example.csv');
		const read = readVehicleCsv(bytes);
		expect(read.issues).toEqual([]);
		expect(read.rows).toHaveLength(5);
		const cells = Papa.parse<Record<string, string>>(bytes.toString('utf8'), {
			header: true,
			skipEmptyLines: true
		}).data;
		expect(read.rows.map((r) => Object.fromEntries(vehicleColumns.map((c) => [c, String(r.data[c])])))).toEqual(cells);
		for (const row of read.rows) expect(row.data.source).toMatch(/^Invented/);
	});
});

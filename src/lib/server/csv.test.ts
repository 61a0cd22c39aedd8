// The CSV writer: RFC 4180 quoting and line ends, and cells a spreadsheet would run as a formula neutralised (OWASP
// "CSV Injection"). Read back with papaparse, the parser the import uses.
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { csvCell, csvLine, startsLikeFormula, toCsv, unguard } from './csv';

const parse = (text: string) => Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { skipEmptyLines: true }).data;

describe('csvCell', () => {
	it('leaves plain text and numbers alone', () => {
		expect(csvCell('Corvane')).toBe('Corvane');
		expect(csvCell(114.3)).toBe('114.3');
		expect(csvCell(0)).toBe('0');
		expect(csvCell('')).toBe('');
		expect(csvCell(null)).toBe('');
		expect(csvCell(undefined)).toBe('');
		expect(csvCell(Number.NaN)).toBe('');
		expect(csvCell(true)).toBe('yes');
	});

	it('quotes a cell with a quote, comma, semicolon or line break and doubles its quotes (RFC 4180 §2.6–2.7)', () => {
		expect(csvCell('say "hi"')).toBe('"say ""hi"""');
		expect(csvCell('a,b')).toBe('"a,b"');
		expect(csvCell('a;b')).toBe('"a;b"');
		expect(csvCell('two\r\nlines')).toBe('"two\r\nlines"');
		expect(csvCell(' padded ')).toBe('" padded "');
	});

	it('neutralises text that a spreadsheet would run as a formula', () => {
		expect(csvCell('=HYPERLINK("http://example.invalid/?x","click")')).toBe(
			`"'=HYPERLINK(""http://example.invalid/?x"",""click"")"`
		);
		expect(csvCell('=1+2')).toBe("'=1+2");
		expect(csvCell('+1')).toBe("'+1");
		expect(csvCell('-cmd')).toBe("'-cmd");
		expect(csvCell('@x')).toBe("'@x");
		expect(csvCell('\t=1+2')).toBe(`"'\t=1+2"`);
		expect(csvCell('\r=1+2')).toBe(`"'\r=1+2"`);
		expect(csvCell('\n=1+2')).toBe(`"'\n=1+2"`);
		expect(csvCell('＝1+2')).toBe("'＝1+2");
		// Text that only contains the characters later on is not a formula.
		expect(csvCell('a=b')).toBe('a=b');
		expect(csvCell("it's")).toBe("it's");
	});

	it('writes numbers as numbers, negative ones included (they come from numeric columns, never from text)', () => {
		expect(csvCell(-12.5)).toBe('-12.5');
		expect(csvCell('-12.5')).toBe("'-12.5");
	});
});

describe('csvLine and toCsv', () => {
	it('ends every record with CRLF and starts the file with a byte order mark', () => {
		expect(csvLine(['a', 1, null])).toBe('a,1,\r\n');
		const file = toCsv(['make', 'notes'], [['Corvane', 'x']]);
		expect(file).toBe('\uFEFFmake,notes\r\nCorvane,x\r\n');
		expect(toCsv(['a'], [], { bom: false })).toBe('a\r\n');
	});

	it('round-trips through papaparse, the guard apostrophe being the only change', () => {
		const nasty = [
			'=HYPERLINK("http://example.invalid","x")',
			'+1',
			'@x',
			'-cmd',
			'two\r\nlines, "quoted"',
			'semi;colon',
			'plain'
		];
		const file = toCsv(
			['n', 'text'],
			nasty.map((t, i) => [i, t])
		);
		const rows = parse(file);
		expect(rows[0]).toEqual(['n', 'text']);
		expect(rows.slice(1).map((r) => r[1])).toEqual(nasty.map((t) => (startsLikeFormula(t) ? `'${t}` : t)));
		for (const [, cell] of rows.slice(1)) expect(startsLikeFormula(cell)).toBe(false);
		expect(rows.slice(1).map((r) => unguard(r[1]))).toEqual(nasty);
	});
});

describe('unguard', () => {
	it('removes only an apostrophe that guards a formula character', () => {
		expect(unguard("'=1+2")).toBe('=1+2');
		expect(unguard("'-cmd")).toBe('-cmd');
		expect(unguard("'quoted'")).toBe("'quoted'");
		expect(unguard('plain')).toBe('plain');
	});
});

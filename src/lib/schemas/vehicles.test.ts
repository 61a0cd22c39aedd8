// The vehicle record schema: one row of an import or one save of the edit form. Every field is text in; the checks
// below are the ones a manager meets, with the message they read.
import { describe, expect, it } from 'vitest';
import { fieldErrors, normaliseThread, roundDecimal, vehicleDataSchema, type VehicleInput } from './vehicles';

/** An invented record (no real vehicle), as text the way a CSV row or a form delivers it. */
const row = (overrides: Partial<VehicleInput> = {}): VehicleInput => ({
	make: 'Corvane',
	model: 'Tessa',
	trim: 'GL',
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
	notes: '',
	source: 'Invented test data',
	...overrides
});

const errorsOf = (input: Partial<VehicleInput>) => {
	const parsed = vehicleDataSchema.safeParse(input);
	if (parsed.success) throw new Error(`expected a refusal, got ${JSON.stringify(parsed.data)}`);
	return fieldErrors(parsed.error);
};

describe('vehicleDataSchema', () => {
	it('reads a good row into numbers and one spelling of each value', () => {
		const parsed = vehicleDataSchema.parse(
			row({
				make: '  Corvane   Motor ',
				trim: ' GL ',
				thread: 'm12 x 1.5',
				tire_front: '215/55r17 94v',
				tire_rear: 'P225/60R16 97H',
				tpms: ' Direct ',
				notes: 'Two lines:\nlocking nut in the glovebox'
			})
		);
		expect(parsed).toEqual({
			make: 'Corvane Motor',
			model: 'Tessa',
			trim: 'GL',
			year_from: 2016,
			year_to: 2021,
			stud_count: 5,
			bolt_circle_mm: 114.3,
			centre_bore_mm: 64.1,
			thread: 'M12x1.5',
			hex_mm: 19,
			torque_nm: 110,
			tire_front: '215/55R17 94V',
			tire_rear: 'P225/60R16 97H',
			placard_front_kpa: 230,
			placard_rear_kpa: 220,
			tpms: 'direct',
			notes: 'Two lines:\nlocking nut in the glovebox',
			source: 'Invented test data'
		});
	});

	it('takes a blank trim, notes and source, but not a blank make, model or measurement', () => {
		expect(vehicleDataSchema.safeParse(row({ trim: '', notes: '', source: '' })).success).toBe(true);
		const errors = errorsOf(row({ make: ' ', model: '', torque_nm: '' }));
		expect(errors.make).toMatch(/Make is missing/);
		expect(errors.model).toMatch(/Model is missing/);
		expect(errors.torque_nm).toBe('Torque is missing: enter it in N·m, e.g. 110');
	});

	it('names a field that is absent altogether', () => {
		const { torque_nm: _, ...rest } = row();
		expect(errorsOf(rest).torque_nm).toMatch(/Torque is missing/);
	});

	it('takes 3 to 10 studs and says so otherwise', () => {
		for (const studs of ['3', '10']) expect(vehicleDataSchema.safeParse(row({ stud_count: studs })).success).toBe(true);
		for (const studs of ['2', '11', '4.5', 'five'])
			expect(errorsOf(row({ stud_count: studs })).stud_count).toMatch(/from 3 to 10/);
	});

	it('points a bolt pattern typed into one field at the two fields it belongs in', () => {
		expect(errorsOf(row({ stud_count: '5x114.3' })).stud_count).toMatch(/Write 5 here and the bolt circle \(114.3\)/);
		expect(errorsOf(row({ bolt_circle_mm: '5x114.3' })).bolt_circle_mm).toMatch(/stud count and the bolt circle/);
	});

	it('suggests the millimetres when a bolt circle or centre bore looks like inches (1 in = 25.4 mm, exact)', () => {
		expect(errorsOf(row({ bolt_circle_mm: '4.5' })).bolt_circle_mm).toBe(
			'Bolt circle must be from 50 to 300 mm; got 4.5. If that is in inches, it is 114.3 mm.'
		);
		expect(errorsOf(row({ hex_mm: '13/16' })).hex_mm).toMatch(/If that is 13\/16 in, it is 20.64 mm/);
	});

	it('suggests the kPa when a placard pressure looks like psi or bar (1 psi = 6.894757 kPa, NIST SP 811)', () => {
		expect(errorsOf(row({ placard_front_kpa: '35' })).placard_front_kpa).toMatch(/If that is psi, it is 241.3 kPa/);
		expect(errorsOf(row({ placard_rear_kpa: '2.4' })).placard_rear_kpa).toMatch(/If that is bar, it is 240 kPa/);
		expect(errorsOf(row({ placard_rear_kpa: '1200' })).placard_rear_kpa).toMatch(/from 100 to 1000 kPa/);
	});

	it('refuses signs, exponents and decimal commas in a number, saying what it read', () => {
		expect(errorsOf(row({ torque_nm: '-110' })).torque_nm).toMatch(/must be a number in N·m.*got "-110"/);
		expect(errorsOf(row({ torque_nm: '1e2' })).torque_nm).toMatch(/must be a number/);
		expect(errorsOf(row({ torque_nm: '110,5' })).torque_nm).toMatch(/Use a point for decimals/);
	});

	it('rounds to what the column stores, half away from zero on the digits', () => {
		const parsed = vehicleDataSchema.parse(row({ torque_nm: '108.45', bolt_circle_mm: '114.305' }));
		expect(parsed.torque_nm).toBe(108.5);
		expect(parsed.bolt_circle_mm).toBe(114.31);
		// As a double 1.005 is just below 1.005, so Math.round(1.005 * 100) / 100 gives 1; NUMERIC(…, 2) stores 1.01.
		expect(roundDecimal('1.005', 2)).toBe(1.01);
		expect(roundDecimal('99.95', 1)).toBe(100);
		expect(roundDecimal('7', 1)).toBe(7);
	});

	it('reads threads in metric and inch spellings and refuses the rest', () => {
		expect(normaliseThread('M12x1.5')).toBe('M12x1.5');
		expect(normaliseThread('M14x1.25')).toBe('M14x1.25');
		expect(normaliseThread('m14 X 2')).toBe('M14x2.0');
		expect(normaliseThread('M12x1,5')).toBe('M12x1.5');
		expect(normaliseThread('1/2-20')).toBe('1/2-20');
		expect(normaliseThread('7/16-20')).toBe('7/16-20');
		expect(normaliseThread('9/16"-18 UNF')).toBe('9/16-18');
		for (const bad of ['M12', '12x1.5', 'M40x1.5', 'M12x0.5', '2/4-20', '1/3-20', '1/2', 'half inch'])
			expect(normaliseThread(bad), bad).toBeUndefined();
		expect(errorsOf(row({ thread: 'M12' })).thread).toMatch(/M12x1.5, M14x1.25.*1\/2-20, 7\/16-20/);
	});

	it('reads tire sizes through parseTireSize and passes on its message', () => {
		expect(errorsOf(row({ tire_rear: '215/55' })).tire_rear).toMatch(/^OE size rear: /);
		expect(errorsOf(row({ tire_front: '' })).tire_front).toMatch(/^OE size front: Enter a tire size/);
	});

	it('takes direct, indirect or none for TPMS', () => {
		expect(vehicleDataSchema.parse(row({ tpms: 'NONE' })).tpms).toBe('none');
		expect(errorsOf(row({ tpms: 'yes' })).tpms).toMatch(/direct, indirect or none/);
	});

	it('checks the year order alongside the other fields', () => {
		const errors = errorsOf(row({ year_from: '2021', year_to: '2016', torque_nm: 'x' }));
		expect(errors.year_to).toMatch(/last model year is before the first/);
		expect(errors.torque_nm).toMatch(/must be a number/);
		expect(errorsOf(row({ year_from: '16' })).year_from).toMatch(/4-digit year from 1900/);
	});

	it('refuses control characters and over-long text', () => {
		expect(errorsOf(row({ notes: 'bell\u0007' })).notes).toMatch(/control character/);
		expect(errorsOf(row({ model: 'x'.repeat(61) })).model).toMatch(/at most 60 characters/);
	});
});

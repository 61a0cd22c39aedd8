// The wheel record's save body at every boundary: what a technician may send, and the message when it is refused.
import { describe, expect, it } from 'vitest';
import { NOTES_MAX, WEIGHTS_MAX, dotCodeSchema, recordPatchSchema } from './record';

/** The messages of a refused body, by joined path ('' for the body itself). */
function refused(body: unknown): Record<string, string[]> {
	const result = recordPatchSchema.safeParse(body);
	expect(result.success, JSON.stringify(body)).toBe(false);
	const byPath: Record<string, string[]> = {};
	for (const issue of result.error!.issues) (byPath[issue.path.join('.')] ??= []).push(issue.message);
	return byPath;
}

function accepted(body: unknown) {
	const result = recordPatchSchema.safeParse(body);
	expect(result.error?.issues ?? [], JSON.stringify(body)).toEqual([]);
	return result.data!;
}

const weight = { plane: 'inner', type: 'adhesive', grams: 25, angleDeg: 90 } as const;

describe('recordPatchSchema: partial saves', () => {
	it('keeps only the fields sent, so a save in parts changes nothing else', () => {
		expect(accepted({ version: 0, treadDepthMm: 6.5 })).toEqual({ version: 0, treadDepthMm: 6.5 });
		expect(accepted({ version: 3, torqueAppliedNm: 110 })).toEqual({ version: 3, torqueAppliedNm: 110 });
		expect(Object.keys(accepted({ version: 1, weights: [weight] }))).toEqual(['version', 'weights']);
	});

	it('accepts a whole record in one save', () => {
		const whole = {
			version: 2,
			treadDepthMm: 7.1,
			dotCode: 'DOT U2LL LMLR 2319',
			pressureSetKpa: 240,
			weights: [weight, { plane: 'outer', type: 'clip', grams: 15, angleDeg: 270 }],
			forceBeforeN: 150,
			forceAfterN: 80,
			matchMounted: true,
			matchMountDeg: 160,
			torqueAppliedNm: 110,
			damage: { tire: ['puncture'], rim: ['curb rash'], puncture: { location: 'tread', diameterMm: 3, angled: false } },
			notes: 'Nail in the centre rib.\nPlug and patch.'
		};
		expect(accepted(whole)).toEqual(whole);
	});

	it('clears a field with null where a blank makes sense', () => {
		const p = accepted({
			version: 4,
			treadDepthMm: null,
			dotCode: null,
			pressureSetKpa: null,
			forceBeforeN: null,
			forceAfterN: null,
			matchMountDeg: null,
			torqueAppliedNm: null
		});
		expect(p.treadDepthMm).toBeNull();
		expect(p.matchMountDeg).toBeNull();
	});

	it('does not take null for the fields the record always has: weights, match-mounted, damage, notes', () => {
		for (const field of ['weights', 'matchMounted', 'damage', 'notes']) {
			expect(refused({ version: 1, [field]: null })[field], field).toHaveLength(1);
		}
		// They are cleared with an empty value instead.
		expect(accepted({ version: 1, weights: [], notes: '', damage: {} })).toEqual({
			version: 1,
			weights: [],
			notes: '',
			damage: { tire: [], rim: [] }
		});
	});

	it('needs the record version the screen saw, 0 for no record yet', () => {
		expect(accepted({ version: 0, notes: 'x' }).version).toBe(0);
		expect(refused({ notes: 'x' }).version).toEqual([
			'Send the record version the screen showed (0 when there is no record yet)'
		]);
		expect(refused({ version: -1, notes: 'x' }).version).toEqual(['The record version is 0 or more']);
		expect(refused({ version: 1.5, notes: 'x' }).version).toEqual(['The record version is a whole number']);
	});

	it('refuses a save with nothing in it', () => {
		expect(refused({ version: 1 })['']).toEqual(['Nothing to save: enter at least one measurement']);
	});

	it('refuses unknown keys, naming them and the fields it takes', () => {
		const top = refused({ version: 1, treadDepth: 5 })[''];
		// The unknown key comes first (the API's summary line shows the first issue); with no known field sent, the
		// save is also empty.
		expect(top).toHaveLength(2);
		expect(top[1]).toBe('Nothing to save: enter at least one measurement');
		expect(top[0]).toMatch(/^Unknown field "treadDepth" in the wheel record: it takes version, treadDepthMm, /);
		expect(refused({ version: 1, notes: 'x', pressure: 240 })['']).toEqual([expect.stringMatching(/"pressure"/)]);
		expect(refused({ version: 1, weights: [{ ...weight, material: 'lead' }] })['weights.0']).toEqual([
			'Unknown field "material" in a weight: it takes plane, type, grams, angleDeg'
		]);
		expect(refused({ version: 1, damage: { tyre: [] } })['damage'][0]).toMatch(/Unknown field "tyre" in the damage/);
		expect(
			refused({ version: 1, damage: { puncture: { location: 'tread', diameterMm: 3, depth: 2 } } })[
				'damage.puncture'
			][0]
		).toMatch(/Unknown field "depth" in the puncture/);
	});

	it('refuses a body that is not an object', () => {
		expect(refused([1, 2])['']).toEqual([expect.stringMatching(/^Send the wheel record as an object/)]);
	});
});

describe('recordPatchSchema: tread depth, pressure, force, torque (SI)', () => {
	it('refuses a negative tread depth and takes 0 to 20 mm', () => {
		expect(refused({ version: 1, treadDepthMm: -0.5 }).treadDepthMm).toEqual(['Tread depth cannot be negative']);
		expect(accepted({ version: 1, treadDepthMm: 0 }).treadDepthMm).toBe(0);
		expect(accepted({ version: 1, treadDepthMm: 20 }).treadDepthMm).toBe(20);
		expect(refused({ version: 1, treadDepthMm: 20.01 }).treadDepthMm[0]).toMatch(/over 20 mm .* check the unit/);
	});

	it('refuses text, NaN and infinity where a number is due', () => {
		expect(refused({ version: 1, treadDepthMm: '5' }).treadDepthMm).toEqual(['Tread depth must be a number in mm']);
		expect(refused({ version: 1, pressureSetKpa: Number.POSITIVE_INFINITY }).pressureSetKpa).toEqual([
			'Pressure must be a number in kPa'
		]);
		expect(refused({ version: 1, forceAfterN: Number.NaN }).forceAfterN).toHaveLength(1);
	});

	it('takes pressure 0 to 700 kPa', () => {
		expect(accepted({ version: 1, pressureSetKpa: 700 }).pressureSetKpa).toBe(700);
		expect(refused({ version: 1, pressureSetKpa: 700.1 }).pressureSetKpa[0]).toMatch(/over 700 kPa/);
		expect(refused({ version: 1, pressureSetKpa: -1 }).pressureSetKpa).toEqual(['Pressure cannot be negative']);
	});

	it('takes force variation before and after 0 to 2000 N', () => {
		expect(accepted({ version: 1, forceBeforeN: 0, forceAfterN: 2000 })).toMatchObject({ forceAfterN: 2000 });
		expect(refused({ version: 1, forceBeforeN: 2000.5 }).forceBeforeN[0]).toMatch(/over 2000 N/);
		expect(refused({ version: 1, forceAfterN: -3 }).forceAfterN).toEqual(['Force variation after cannot be negative']);
	});

	it('takes torque 0 to 1000 N·m', () => {
		expect(accepted({ version: 1, torqueAppliedNm: 1000 }).torqueAppliedNm).toBe(1000);
		expect(refused({ version: 1, torqueAppliedNm: 1001 }).torqueAppliedNm[0]).toMatch(/over 1000 N·m/);
	});

	it('takes a match-mount rotation of 0 to 360°, only on a match-mounted tire', () => {
		expect(accepted({ version: 1, matchMounted: true, matchMountDeg: 360 }).matchMountDeg).toBe(360);
		expect(accepted({ version: 1, matchMountDeg: 0 }).matchMountDeg).toBe(0);
		expect(refused({ version: 1, matchMountDeg: 361 }).matchMountDeg[0]).toMatch(/0 to 360°/);
		expect(refused({ version: 1, matchMountDeg: -1 }).matchMountDeg[0]).toMatch(/0 to 360°/);
		expect(refused({ version: 1, matchMounted: false, matchMountDeg: 90 }).matchMountDeg[0]).toMatch(
			/only recorded for a match-mounted tire/
		);
		expect(accepted({ version: 1, matchMounted: false, matchMountDeg: null }).matchMounted).toBe(false);
	});
});

describe('recordPatchSchema: DOT code', () => {
	it('refuses week 60 with the week-then-year hint', () => {
		expect(refused({ version: 1, dotCode: '6019' }).dotCode).toEqual([
			'DOT week 60 does not exist: the last four digits are week then year, e.g. 2319'
		]);
		expect(refused({ version: 1, dotCode: 'DOT U2LL LMLR 6019' }).dotCode).toEqual([
			'DOT week 60 does not exist: the last four digits are week then year, e.g. 2319'
		]);
		expect(refused({ version: 1, dotCode: '0019' }).dotCode[0]).toMatch(/^DOT week 00 does not exist/);
	});

	it('takes weeks 01 to 53 of years that have them [49 CFR 574.5, via parseDotDate]', () => {
		expect(accepted({ version: 1, dotCode: '0119' }).dotCode).toBe('0119');
		expect(accepted({ version: 1, dotCode: '5323' }).dotCode).toBe('5323');
		// 2019 has no week 53 (1 Jan 2019 was a Tuesday): parseDotDate's message is passed on.
		expect(refused({ version: 1, dotCode: '5319' }).dotCode[0]).toMatch(/Week 53 does not exist in 2019/);
	});

	it('refuses a week that has not started yet [practice: a future date is a misreading]', () => {
		expect(refused({ version: 1, dotCode: '2299' }).dotCode[0]).toMatch(/week 22 of 2099, which has not started yet/);
	});

	it('takes the full TIN or only the date code, trimmed, upper-cased, spaces collapsed', () => {
		expect(accepted({ version: 1, dotCode: '  dot u2ll   lmlr 2319 ' }).dotCode).toBe('DOT U2LL LMLR 2319');
		expect(accepted({ version: 1, dotCode: 'U2LLLMLR2319' }).dotCode).toBe('U2LLLMLR2319');
		expect(accepted({ version: 1, dotCode: 'DOT-U2LL-LMLR-2319' }).dotCode).toBe('DOT-U2LL-LMLR-2319');
		expect(dotCodeSchema.parse('\t2319\n')).toBe('2319');
	});

	it('keeps a three-digit (pre-2000) code, which the flags then report', () => {
		expect(accepted({ version: 1, dotCode: 'DOT XB 12AB 439' }).dotCode).toBe('DOT XB 12AB 439');
	});

	it('refuses a blank, stray characters, text with no date code, and a code too long to be a TIN', () => {
		expect(refused({ version: 1, dotCode: '   ' }).dotCode[0]).toMatch(/^Enter the DOT code/);
		expect(refused({ version: 1, dotCode: 'DOT U2LL/2319' }).dotCode).toEqual([
			'A DOT code has only letters and digits, e.g. DOT U2LL LMLR 2319'
		]);
		expect(refused({ version: 1, dotCode: 'DOT U2LL LMLR' }).dotCode[0]).toMatch(/not a date code/);
		expect(refused({ version: 1, dotCode: 'A'.repeat(41) }).dotCode[0]).toMatch(/at most 13 letters and digits/);
		expect(refused({ version: 1, dotCode: 2319 }).dotCode[0]).toMatch(/^Enter the DOT code as text/);
	});
});

describe('recordPatchSchema: weights', () => {
	it('refuses a single weight over 200 g, takes 200 g', () => {
		expect(refused({ version: 1, weights: [{ ...weight, grams: 201 }] })['weights.0.grams']).toEqual([
			'A single weight over 200 g is not a sane reading; check the amount and the unit'
		]);
		expect(accepted({ version: 1, weights: [{ ...weight, grams: 200 }] }).weights![0].grams).toBe(200);
	});

	it('refuses a weight of 0 g or less', () => {
		expect(refused({ version: 1, weights: [{ ...weight, grams: 0 }] })['weights.0.grams']).toEqual([
			'A weight must be more than 0 g; remove the line instead'
		]);
	});

	it('takes angles 0 to 360° and refuses others', () => {
		expect(
			accepted({
				version: 1,
				weights: [
					{ ...weight, angleDeg: 0 },
					{ ...weight, angleDeg: 360 }
				]
			}).weights
		).toHaveLength(2);
		expect(refused({ version: 1, weights: [{ ...weight, angleDeg: 360.5 }] })['weights.0.angleDeg'][0]).toMatch(
			/0 to 360° round from the valve stem/
		);
	});

	it('names the plane and the type when they are wrong', () => {
		const issues = refused({ version: 1, weights: [{ ...weight, plane: 'middle', type: 'tape' }] });
		expect(issues['weights.0.plane']).toEqual(['Say which plane the weight is on: inner or outer']);
		expect(issues['weights.0.type']).toEqual(['Say how the weight is fixed: clip or adhesive']);
	});

	it(`takes at most ${WEIGHTS_MAX} weights`, () => {
		expect(accepted({ version: 1, weights: Array(WEIGHTS_MAX).fill(weight) }).weights).toHaveLength(WEIGHTS_MAX);
		expect(refused({ version: 1, weights: Array(WEIGHTS_MAX + 1).fill(weight) }).weights[0]).toMatch(
			/At most 8 weights/
		);
	});
});

describe('recordPatchSchema: damage', () => {
	it('takes our own damage words and a puncture with its place and size', () => {
		const p = accepted({
			version: 1,
			damage: { tire: ['sidewall cut', 'bulge'], puncture: { location: 'shoulder', diameterMm: 4 } }
		});
		expect(p.damage).toEqual({
			tire: ['sidewall cut', 'bulge'],
			rim: [],
			puncture: { location: 'shoulder', diameterMm: 4 }
		});
	});

	it('refuses words outside the lists, and the same word twice', () => {
		expect(refused({ version: 1, damage: { tire: ['flat spot'] } })['damage.tire.0'][0]).toMatch(
			/^Tire damage is one of: puncture, sidewall cut/
		);
		expect(refused({ version: 1, damage: { rim: ['dented'] } })['damage.rim.0'][0]).toMatch(
			/^Rim damage is one of: bent/
		);
		expect(refused({ version: 1, damage: { rim: ['bent', 'bent'] } })['damage.rim']).toEqual([
			'Tick each kind of rim damage only once'
		]);
	});

	it('refuses a puncture with no size, a size of 0 or over 50 mm, or an unknown place', () => {
		expect(refused({ version: 1, damage: { puncture: { location: 'tread' } } })['damage.puncture.diameterMm']).toEqual([
			'The injury’s diameter must be a number in mm'
		]);
		expect(
			refused({ version: 1, damage: { puncture: { location: 'tread', diameterMm: 0 } } })['damage.puncture.diameterMm']
		).toEqual(['Measure the injury’s diameter: it must be more than 0 mm']);
		expect(
			refused({ version: 1, damage: { puncture: { location: 'tread', diameterMm: 51 } } })[
				'damage.puncture.diameterMm'
			][0]
		).toMatch(/a cut, not a puncture/);
		expect(
			refused({ version: 1, damage: { puncture: { location: 'rim', diameterMm: 3 } } })['damage.puncture.location']
		).toEqual(['Say where the injury is: tread, shoulder, sidewall, bead']);
	});
});

describe('recordPatchSchema: notes', () => {
	it('refuses NUL and other control characters', () => {
		const message = ['Notes contain a control character (pasted from another program?); retype them'];
		expect(refused({ version: 1, notes: 'nail\u0000' }).notes).toEqual(message);
		expect(refused({ version: 1, notes: 'a\u001b[31mred' }).notes).toEqual(message);
		expect(refused({ version: 1, notes: 'a\u007fb' }).notes).toEqual(message);
		expect(refused({ version: 1, notes: 'a\u0085b' }).notes).toEqual(message);
	});

	it('keeps newlines and tabs, and turns a textarea’s CR LF into newlines', () => {
		expect(accepted({ version: 1, notes: 'line 1\r\nline 2\tok\rline 3' }).notes).toBe('line 1\nline 2\tok\nline 3');
		expect(accepted({ version: 1, notes: 'Rim: curb rash, LF.\n' }).notes).toBe('Rim: curb rash, LF.');
	});

	it(`takes ${NOTES_MAX} characters and refuses one more`, () => {
		expect(accepted({ version: 1, notes: 'x'.repeat(NOTES_MAX) }).notes).toHaveLength(NOTES_MAX);
		expect(refused({ version: 1, notes: 'x'.repeat(NOTES_MAX + 1) }).notes[0]).toMatch(/at most 2000 characters/);
	});
});

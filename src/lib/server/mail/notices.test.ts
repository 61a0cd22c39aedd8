import { describe, expect, it } from 'vitest';
import { oneLine, render, type NoticeFacts } from './notices';

const facts: NoticeFacts = {
	store: {
		name: 'Invented Tires & Co',
		phone: '+1 555 0100',
		email: 'counter@example.test',
		address: '1 Invented Way\nTestville',
		timezone: 'America/Chicago'
	},
	job: {
		number: 42,
		doneAt: '2026-12-02T15:30:00Z',
		vehicle: 'Invented Motors Roadster',
		plate: 'TEST 1',
		services: ['Mount and balance']
	},
	customer: { name: 'Ann Invented' },
	retorqueAfterDays: 3
};

describe('oneLine', () => {
	it('leaves no CR, LF or other control character, so nothing can start a header', () => {
		expect(oneLine('Mallory\r\nBcc: x@y')).toBe('Mallory Bcc: x@y');
		expect(oneLine('a\u2028b\u0000c\td')).toBe('a b c d');
		expect(oneLine('x'.repeat(300), 10)).toBe(`${'x'.repeat(9)}…`);
	});
});

describe('render', () => {
	it('a ready notice names the job, the store and its contact, and the re-torque practice', () => {
		const n = render('ready', facts);
		expect(n.subject).toBe('Your vehicle is ready for pickup (job 42, Invented Tires & Co)');
		expect(n.text).toContain('Your vehicle (Invented Motors Roadster, plate TEST 1) is ready for pickup');
		// 15:30 UTC is 09:30 in Chicago in December.
		expect(n.text).toContain('Job number: 42, finished Dec 2, 2026, 9:30 AM.');
		expect(n.text).toContain('1 Invented Way, Testville');
		expect(n.text).toContain('after the first 50–100 miles (80–160 km) is common practice');
		expect(n.text).toContain('We will remind you in 3 days.');
		expect(n.html).toContain('Invented Tires &amp; Co');
		expect(n.html).toContain('href="tel:+15550100"');
	});

	it('without a reminder interval the ready notice does not promise one', () => {
		expect(render('ready', { ...facts, retorqueAfterDays: 0 }).text).not.toContain('remind you');
	});

	it('escapes whatever a customer or a store typed, and has no images or remote resources', () => {
		const hostile = { ...facts, customer: { name: '<img src="https://tracker.example/p.gif">Eve' } };
		for (const kind of ['ready', 'retorque', 'summary'] as const) {
			const n = render(kind, { ...hostile, units: undefined, wheels: [] });
			// No element that loads anything, and no link out but the store's tel: and mailto:.
			expect(n.html).not.toMatch(/<(img|script|iframe|link|object|embed|video|audio|source)\b/i);
			expect(n.html).not.toMatch(/<[^>]*\s(src|background|srcset)=/i);
			expect(n.html).not.toMatch(/url\(/i);
			expect([...n.html.matchAll(/href="([^"]*)"/g)].map((m) => m[1].split(':')[0])).toEqual(['tel', 'mailto']);
			expect(n.html).toContain('&lt;img src=&quot;');
			expect(n.subject).not.toMatch(/[\r\n]/);
		}
	});

	it('a summary shows each wheel in the store’s units with SI beside', () => {
		const n = render('summary', {
			...facts,
			units: { pressure: 'bar', mass: 'g', torque: 'N.m', length: 'mm', tread: 'mm', force: 'N' },
			wheels: [
				{
					position: 'LR',
					treadDepthMm: 1.2,
					dotCode: '123',
					pressureSetKpa: 250,
					torqueAppliedNm: 120,
					damage: { tire: [], rim: [] }
				}
			]
		});
		expect(n.subject).toBe('Service summary (job 42, Invented Tires & Co)');
		expect(n.text).toContain('LR (left rear)');
		expect(n.text).toContain('Tread depth: 1.2 mm');
		expect(n.text).toContain('Tire age: made before 2000: over 20 years old');
		expect(n.text).toContain('Pressure set (cold): 2.50 bar (250 kPa)');
		expect(n.text).toContain('Torque applied: 120 N·m');
		expect(n.text).toContain('Damage and repairs: none found');
	});

	it('refuses a payload that does not hold the facts', () => {
		expect(() => render('ready', { store: {} })).toThrow();
	});
});

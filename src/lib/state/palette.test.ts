import { describe, expect, it } from 'vitest';
import type { Command } from '$lib/console/commands';
import type { JobView } from '$lib/schemas/floor';
import { Palette, readRecent, type RecentStorage, type Result } from './palette.svelte';
import { job } from './test-fixtures';

/** A Storage stand-in: the unit tests run without a DOM. */
function memoryStorage(initial: Record<string, string> = {}): RecentStorage & { data: Map<string, string> } {
	const data = new Map(Object.entries(initial));
	return {
		data,
		getItem: (key) => data.get(key) ?? null,
		setItem: (key, value) => void data.set(key, value)
	};
}

const command = (id: string, title: string): Command => ({
	id,
	title,
	label: title,
	keywords: [],
	keys: [],
	roles: ['writer'],
	run: () => {}
});

const commands = [command('new-job', 'New job (intake)'), command('help', 'Show the keys')];
const floor = [
	job(1, { plate: 'KTR 418', customer: { id: 1, name: 'Halvard Quennell', phone: '412-555-0142' } }),
	job(2)
];
const KEY = 'lugline:recent:7';

const result = (kind: Result['kind'], id: string, text: string): Result => ({
	key: `${kind}:${id}`,
	kind,
	id,
	text,
	ranges: []
});

/** `key` null: a palette without a storage key. */
function palette(storage: RecentStorage, jobs: JobView[] = floor, key: string | null = KEY) {
	return new Palette(
		() => commands,
		() => jobs,
		() => Promise.reject(new Error('no network in unit tests')),
		key ?? undefined,
		storage
	);
}

describe('recent picks', () => {
	it('survive a reload, newest first, each once', () => {
		const storage = memoryStorage();
		const first = palette(storage);
		first.remember(result('job', '1', '#1001 Halvard Quennell KTR 418'));
		first.remember(result('vehicle', '42', '2014–2019 Corvane Lira LX 215/55R17'));
		first.remember(result('command', 'help', 'Show the keys'));
		first.remember(result('job', '1', '#1001 Halvard Quennell KTR 418'));

		const reloaded = palette(storage);
		expect(reloaded.query).toBe('');
		expect(reloaded.results.map((r) => r.key)).toEqual(['job:1', 'command:help', 'vehicle:42']);
		expect(reloaded.results.every((r) => r.ranges.length === 0)).toBe(true);
	});

	it('drop a job no longer on the floor and a command this screen no longer has', () => {
		const storage = memoryStorage();
		const first = palette(storage);
		first.remember(result('job', '2', '#1002 Customer 2'));
		first.remember(result('command', 'retired', 'A command that is gone'));
		first.remember(result('job', '1', '#1001 Halvard Quennell KTR 418'));

		const later = palette(storage, [floor[0]]);
		expect(later.results.map((r) => r.key)).toEqual(['job:1']);
		// What is shown comes from today's floor, not from what was stored.
		expect(later.results[0].text).toContain('Halvard Quennell');
		later.remember(result('command', 'help', 'Show the keys'));
		expect(readRecent(storage, KEY).map((r) => `${r.kind}:${r.id}`)).toEqual(['command:help', 'job:1']);
	});

	it('keep at most eight', () => {
		const storage = memoryStorage();
		const p = palette(storage);
		for (let i = 1; i <= 12; i++) p.remember(result('vehicle', String(i), `Vehicle ${i}`));
		expect(palette(storage).results.map((r) => r.id)).toEqual(['12', '11', '10', '9', '8', '7', '6', '5']);
	});

	it('are kept per user', () => {
		const storage = memoryStorage();
		palette(storage, floor, 'lugline:recent:7').remember(result('job', '1', '#1001'));
		expect(palette(storage, floor, 'lugline:recent:8').results).toEqual([]);
		expect(palette(storage, floor, 'lugline:recent:7').results).toHaveLength(1);
	});

	it('without a storage key, last only as long as the palette', () => {
		const storage = memoryStorage();
		const p = palette(storage, floor, null);
		p.remember(result('job', '1', '#1001'));
		expect(p.results.map((r) => r.key)).toEqual(['job:1']);
		expect(storage.data.size).toBe(0);
		expect(palette(storage, floor, null).results).toEqual([]);
	});

	it('never remember customers (they are not palette results)', () => {
		const storage = memoryStorage();
		palette(storage).remember(result('customer', '5', 'Someone'));
		expect(readRecent(storage, KEY)).toEqual([]);
	});

	it.each([
		['not JSON', '{oops'],
		['not a list', '{"kind":"job","id":"1","text":"x"}'],
		['a wrong kind', '[{"kind":"customer","id":"1","text":"x"}]'],
		['a missing id', '[{"kind":"job","text":"x"}]'],
		['a number for an id', '[{"kind":"job","id":1,"text":"x"}]']
	])('read as none when the stored value is %s', (_, stored) => {
		const storage = memoryStorage({ [KEY]: stored });
		expect(readRecent(storage, KEY)).toEqual([]);
		expect(palette(storage).results).toEqual([]);
	});

	it('survive a storage that refuses to read or write', () => {
		const broken: RecentStorage = {
			getItem: () => {
				throw new Error('SecurityError');
			},
			setItem: () => {
				throw new Error('QuotaExceededError');
			}
		};
		const p = palette(broken);
		expect(p.results).toEqual([]);
		p.remember(result('job', '1', '#1001'));
		expect(p.results.map((r) => r.key)).toEqual(['job:1']);
	});
});

describe('local search', () => {
	it('finds today’s jobs and commands as the query is typed, and the recent picks when it is cleared', () => {
		const storage = memoryStorage();
		const p = palette(storage);
		p.remember(result('command', 'help', 'Show the keys'));
		p.query = 'quenel';
		expect(p.results[0]).toMatchObject({ key: 'job:1', kind: 'job', id: '1' });
		expect(p.resultsFor).toBe('quenel');
		p.query = 'new job';
		expect(p.results[0]).toMatchObject({ key: 'command:new-job', kind: 'command', id: 'new-job' });
		p.query = '';
		expect(p.results.map((r) => r.key)).toEqual(['command:help']);
	});
});

import { describe, expect, it } from 'vitest';
import { anchors, hurriedQueries, inventedRecords } from './fixture';
import { addRecord, createIndex, removeRecord, search, size, type SearchRecord } from './index';
import { osaDistance } from './text';

const records = inventedRecords(5000);
const index = createIndex(records);
const byId = new Map(records.map((r) => [r.id, r]));

describe('relevance over 5,000 invented records', () => {
	it('puts the expected record in the top 3 for at least 95 % of the hurried queries', () => {
		expect(hurriedQueries.length).toBeGreaterThanOrEqual(30);
		const misses: string[] = [];
		for (const q of hurriedQueries) {
			const top = search(index, q.query, 3).map((h) => h.id);
			if (!top.includes(q.expect)) misses.push(`${q.query} → ${top.join(', ') || 'nothing'} (wanted ${q.expect})`);
		}
		const rate = (hurriedQueries.length - misses.length) / hurriedQueries.length;
		console.log(
			`palette relevance: ${hurriedQueries.length - misses.length}/${hurriedQueries.length} = ${(rate * 100).toFixed(1)} % in the top 3` +
				(misses.length ? `\n  missed: ${misses.join('\n  missed: ')}` : '')
		);
		expect(rate).toBeGreaterThanOrEqual(0.95);
	});

	it('forgives an adjacent-letter swap', () => {
		expect(search(index, 'ldoun').map((h) => h.id)).toContain('v-lodun');
		expect(search(index, 'brannawya', 3).map((h) => h.id)).toContain('c-brannaway');
	});

	it('returns nothing for an empty or blank query', () => {
		expect(search(index, '')).toEqual([]);
		expect(search(index, '  – / ')).toEqual([]);
	});

	it('respects the limit and ranks best first', () => {
		const hits = search(index, 'lira', 7);
		expect(hits.length).toBe(7);
		for (let i = 1; i < hits.length; i++) expect(hits[i - 1].score).toBeGreaterThanOrEqual(hits[i].score);
	});
});

describe('every word must match', () => {
	it('drops records that lack a word entirely', () => {
		expect(search(index, 'lira qxzvq')).toEqual([]);
		expect(search(index, 'quennell 9999999')).toEqual([]);
	});

	it('keeps digit words literal: each hit holds every number typed', () => {
		for (const query of ['lira 2014', '0142', 'brisk 225', 'ktr 418', '2155517']) {
			const numbers = query.split(' ').filter((w) => /\d/.test(w));
			const hits = search(index, query);
			expect(hits.length).toBeGreaterThan(0);
			for (const h of hits) {
				const r = byId.get(h.id)!;
				const hay = [r.text, ...(r.aliases ?? [])].join(' ').toLowerCase();
				for (const n of numbers) expect(hay, `${h.id} for “${query}”`).toContain(n);
			}
		}
	});

	it('keeps fuzzy words close: each hit has a token within the allowed edits of every word typed', () => {
		const query = 'corvnae lria';
		const hits = search(index, query);
		expect(hits.length).toBeGreaterThan(0);
		for (const h of hits) {
			const r = byId.get(h.id)!;
			const tokens = [r.text, ...(r.aliases ?? [])]
				.join(' ')
				.toLowerCase()
				.split(/[^\p{L}\p{N}]+/u);
			for (const w of query.split(' ')) {
				const close = tokens.some((t) => osaDistance(w, t.slice(0, w.length), 2) <= 1 || t.startsWith(w));
				expect(close, `${h.id} “${r.text}” for “${w}”`).toBe(true);
			}
		}
	});
});

describe('highlighting', () => {
	const small = createIndex(anchors);
	const rangesOf = (query: string, id: string) => {
		const hit = search(small, query).find((h) => h.id === id);
		expect(hit, `${id} for “${query}”`).toBeDefined();
		const text = small.docs[small.idToDoc.get(id)!]!.text;
		return hit!.ranges.map(([a, b]) => text.slice(a, b));
	};

	it('marks the typed prefix of each word, in text order', () => {
		expect(rangesOf('lira corv', 'v-lira-14')).toEqual(['Corv', 'Lira']);
	});

	it('marks a whole token for a fuzzy match', () => {
		expect(rangesOf('quenell', 'c-quennell')).toEqual(['Quennell']);
	});

	it('maps a digit alias back to the characters in the text', () => {
		expect(rangesOf('2155517', 'v-lira-14')).toEqual(['215/55R17']);
		expect(rangesOf('5550142', 'c-quennell')).toEqual(['555-0142']);
	});

	it('marks a fragment inside a number', () => {
		expect(rangesOf('2093', 'j-1187')).toEqual(['2093']);
		expect(rangesOf('09', 'c-ostrander')).toEqual(['09']);
	});
});

describe('incremental updates', () => {
	const job = (id: string, text: string): SearchRecord => ({ id, kind: 'job', text });

	it('finds an added record, forgets a removed one, and replaces by id', () => {
		const live = createIndex(inventedRecords(500, 7));
		const before = size(live);
		expect(search(live, 'Zephrine')).toEqual([]);

		addRecord(live, job('j-9001', 'job 9001 Zephrine Almacott QWP 612 Corvane Lira'));
		expect(size(live)).toBe(before + 1);
		expect(search(live, 'zephrin 9001', 3)[0]?.id).toBe('j-9001');

		addRecord(live, job('j-9001', 'job 9001 Zephrine Almacott QWP 613 Corvane Lira'));
		expect(size(live)).toBe(before + 1);
		expect(search(live, 'qwp 612')).toEqual([]);
		expect(search(live, 'qwp 613')[0]?.id).toBe('j-9001');

		expect(removeRecord(live, 'j-9001')).toBe(true);
		expect(removeRecord(live, 'j-9001')).toBe(false);
		expect(search(live, 'zephrine')).toEqual([]);
		expect(size(live)).toBe(before);
	});

	it('stays correct through enough churn to compact', () => {
		const live = createIndex([job('keep', 'job 1 Keeper Stays')]);
		for (let i = 0; i < 2500; i++) {
			addRecord(live, job(`t${i}`, `job ${100_000 + i} Transient Person`));
			if (i >= 10) removeRecord(live, `t${i - 10}`);
		}
		expect(size(live)).toBe(11);
		expect(live.docs.length).toBeLessThan(2500);
		expect(search(live, 'transient', 50).length).toBe(10);
		expect(search(live, 'keeper')[0]?.id).toBe('keep');
		expect(search(live, '102499')[0]?.id).toBe('t2499');
	});
});

/**
 * The palette's client-side search: a gram index narrows the records to a few hundred candidates, then fuse.js ranks
 * only those. Fuse.js over everything costs 100+ ms a keystroke at 25,000 records (shared/reference/palette-search.md);
 * as the ranker of 300 it costs well under one. No DOM and no framework, so it runs in a Web Worker as well.
 */
import Fuse from 'fuse.js';
import { fold, termGrams, tokenize } from './text';
import { candidateGrams, queryWord, termScore, type QueryWord } from './words';

export type SearchKind = 'vehicle' | 'job' | 'command' | 'customer';

export interface SearchRecord {
	id: string;
	kind: SearchKind;
	/** What the palette shows; `ranges` point into it. */
	text: string;
	/** Other spellings that should find the record: phone digits joined, plate without spaces, size as 7 digits. */
	aliases?: string[];
}

/** Half-open [start, end) character range in the record's `text`. */
export type Range = [number, number];

export interface SearchHit {
	id: string;
	kind: SearchKind;
	/** 0–1, higher is better. */
	score: number;
	ranges: Range[];
}

/** Tokens per record beyond this are not indexed; the slot has to fit the low byte of a posting. */
const MAX_SLOTS = 255;
/** How many survivors of the filter to gather before choosing; more costs time and rarely changes the top 20. */
const GATHER = 1200;
/** Filter score given up per token position, capped at ten positions. */
const SLOT_COST = 0.01;
/** How many the filter hands to fuse.js. */
const CANDIDATES = 300;
/** Fuse quality credited to a candidate fuse.js rejects: below any fuse hit, so it only wins on a clearly better filter score. */
const FUSE_MISS = 0.4;

/** An Int32Array that grows, so postings stay flat and cheap to walk however records arrive. */
class Postings {
	data = new Int32Array(2);
	length = 0;
	push(v: number) {
		if (this.length === this.data.length) {
			const next = new Int32Array(this.data.length * 2);
			next.set(this.data);
			this.data = next;
		}
		this.data[this.length++] = v;
	}
}

interface WordMatches {
	terms: Int32Array;
	scores: Float64Array;
	byTerm: Map<number, number>;
	/** Postings behind these terms: how many record slots the word could reach, to pick the rarest word. */
	reach: number;
}

export interface SearchIndex {
	terms: string[];
	termIds: Map<string, number>;
	/** Gram → ids of the distinct terms holding it. Terms repeat across records (names, makes), so this stays small. */
	gramTerms: Map<string, Postings>;
	/** Term id → (doc << 8 | slot) postings. */
	termDocs: Postings[];
	/** Doc → record, undefined once removed; removed docs stay in the postings until the next compaction. */
	docs: (SearchRecord | undefined)[];
	docTerms: Int32Array[];
	/** Doc → [start, end] per slot into `text`, -1 for alias slots. */
	docSpans: Int32Array[];
	idToDoc: Map<string, number>;
	dead: number;
	/** Scratch marks so a walk can skip what it saw without allocating a set per keystroke. */
	stamp: Int32Array;
	epoch: number;
	/** Word → matching terms, reused while the writer types the next word; cleared when new terms arrive. */
	wordCache: Map<string, WordMatches>;
	/** Doc → the folded text fuse.js ranks, made on first use: folding text with an en dash costs a normalize(). */
	hay: (string | undefined)[];
	/** Per query word, term → score while a search runs (zero elsewhere): cheaper than a Map lookup per slot. */
	wordScores: Float32Array[];
}

export function createIndex(records: Iterable<SearchRecord> = []): SearchIndex {
	const index: SearchIndex = {
		terms: [],
		termIds: new Map(),
		gramTerms: new Map(),
		termDocs: [],
		docs: [],
		docTerms: [],
		docSpans: [],
		idToDoc: new Map(),
		dead: 0,
		stamp: new Int32Array(1024),
		epoch: 0,
		wordCache: new Map(),
		hay: [],
		wordScores: []
	};
	for (const r of records) addRecord(index, r);
	return index;
}

export function size(index: SearchIndex): number {
	return index.idToDoc.size;
}

function termId(index: SearchIndex, term: string): number {
	let id = index.termIds.get(term);
	if (id !== undefined) return id;
	id = index.terms.length;
	index.terms.push(term);
	index.termIds.set(term, id);
	index.termDocs.push(new Postings());
	for (const g of termGrams(term)) {
		let p = index.gramTerms.get(g);
		if (!p) index.gramTerms.set(g, (p = new Postings()));
		p.push(id);
	}
	index.wordCache.clear();
	return id;
}

/** Adds a record, or replaces the one with the same id (a job whose plate was corrected, say). */
export function addRecord(index: SearchIndex, record: SearchRecord): void {
	if (index.idToDoc.has(record.id)) removeRecord(index, record.id);
	const tokens = tokenize(record.text);
	for (const alias of record.aliases ?? []) tokens.push(...tokenize(alias, true));
	const seen = new Set<string>();
	const kept = tokens.filter((t) => {
		// A repeated alias adds nothing, but a repeated word in the text keeps its own span for highlighting.
		const key = t.start < 0 ? t.term : `${t.term}@${t.start}`;
		if (seen.has(key) || (t.start < 0 && seen.has(t.term))) return false;
		seen.add(key);
		if (t.start >= 0) seen.add(t.term);
		return true;
	});
	const n = Math.min(kept.length, MAX_SLOTS);
	const doc = index.docs.length;
	const terms = new Int32Array(n);
	const spans = new Int32Array(n * 2);
	for (let slot = 0; slot < n; slot++) {
		const t = kept[slot];
		const id = termId(index, t.term);
		terms[slot] = id;
		spans[slot * 2] = t.start;
		spans[slot * 2 + 1] = t.end;
		index.termDocs[id].push((doc << 8) | slot);
	}
	index.docs.push(record);
	index.docTerms.push(terms);
	index.docSpans.push(spans);
	index.hay.push(undefined);
	index.idToDoc.set(record.id, doc);
}

/** Removes a record by id; returns whether it was there. */
export function removeRecord(index: SearchIndex, id: string): boolean {
	const doc = index.idToDoc.get(id);
	if (doc === undefined) return false;
	index.idToDoc.delete(id);
	index.docs[doc] = undefined;
	index.hay[doc] = undefined;
	index.docTerms[doc] = new Int32Array(0);
	index.docSpans[doc] = new Int32Array(0);
	index.dead++;
	// Removed docs cost a skip in every walk; rebuild once they outnumber the living (a day's worth of job churn).
	if (index.dead > 1000 && index.dead > index.idToDoc.size) compact(index);
	return true;
}

function compact(index: SearchIndex) {
	const live = index.docs.filter((r): r is SearchRecord => r !== undefined);
	Object.assign(index, createIndex(live));
}

function nextEpoch(index: SearchIndex, n: number): number {
	if (index.stamp.length < n) index.stamp = new Int32Array(Math.max(n, index.stamp.length * 2));
	if (++index.epoch === 0x7fffffff) {
		index.stamp.fill(0);
		index.epoch = 1;
	}
	return index.epoch;
}

function matchWord(index: SearchIndex, q: QueryWord): WordMatches {
	const cached = index.wordCache.get(q.word);
	if (cached) return cached;
	let grams = candidateGrams(q);
	if (q.mode === 'substring') {
		// Every term containing the word holds each of its grams, so the rarest one alone proposes them all.
		let best = grams[0];
		let bestLen = Infinity;
		for (const g of grams) {
			const len = index.gramTerms.get(g)?.length ?? 0;
			if (len < bestLen) [best, bestLen] = [g, len];
		}
		grams = [best];
	}
	const epoch = nextEpoch(index, index.terms.length);
	const stamp = index.stamp;
	const ids: number[] = [];
	const scores: number[] = [];
	let reach = 0;
	for (const g of grams) {
		const p = index.gramTerms.get(g);
		if (!p) continue;
		const data = p.data;
		for (let i = 0; i < p.length; i++) {
			const t = data[i];
			if (stamp[t] === epoch) continue;
			stamp[t] = epoch;
			const s = termScore(q, index.terms[t]);
			if (s > 0) {
				ids.push(t);
				scores.push(s);
				reach += index.termDocs[t].length;
			}
		}
	}
	const byTerm = new Map<number, number>();
	for (let i = 0; i < ids.length; i++) byTerm.set(ids[i], scores[i]);
	const m: WordMatches = { terms: Int32Array.from(ids), scores: Float64Array.from(scores), byTerm, reach };
	if (index.wordCache.size > 64) index.wordCache.clear();
	index.wordCache.set(q.word, m);
	return m;
}

interface Candidate {
	doc: number;
	score: number;
}

/**
 * First stage: records where every query word matches one of the record's tokens, in any order. Walks the rarest
 * word's postings (best terms first, newest records first) and checks the other words through the record's own terms.
 */
function filter(index: SearchIndex, words: QueryWord[], matches: WordMatches[]): Candidate[] {
	let rarest = 0;
	for (let w = 1; w < matches.length; w++) if (matches[w].reach < matches[rarest].reach) rarest = w;
	const lead = matches[rarest];
	const order = Array.from(lead.terms.keys()).sort((a, b) => lead.scores[b] - lead.scores[a]);
	const scores = wordScores(index, matches);
	const epoch = nextEpoch(index, index.docs.length);
	const stamp = index.stamp;
	const out: Candidate[] = [];
	for (const k of order) {
		const p = index.termDocs[lead.terms[k]];
		for (let i = p.length - 1; i >= 0; i--) {
			const doc = p.data[i] >>> 8;
			if (stamp[doc] === epoch || index.docs[doc] === undefined) continue;
			stamp[doc] = epoch;
			const terms = index.docTerms[doc];
			let total = 0;
			let ok = true;
			for (let w = 0; w < words.length && ok; w++) {
				const score = scores[w];
				let best = 0;
				for (let s = 0; s < terms.length; s++) {
					const v = score[terms[s]];
					// A record leads with what identifies it (job number, name, years), so an equal match there beats
					// one further along, e.g. job 2210 over a plate ending 2210.
					if (v > 0 && v - SLOT_COST * Math.min(s, 10) > best) best = v - SLOT_COST * Math.min(s, 10);
				}
				if (best === 0) ok = false;
				total += best;
			}
			if (ok) out.push({ doc, score: total / words.length });
		}
		if (out.length >= GATHER) break;
	}
	for (let w = 0; w < matches.length; w++) for (const t of matches[w].terms) scores[w][t] = 0;
	return out;
}

/** The scratch arrays of term scores, one per word, filled for this search (the caller zeroes them after). */
function wordScores(index: SearchIndex, matches: WordMatches[]): Float32Array[] {
	const n = index.terms.length;
	for (let w = 0; w < matches.length; w++) {
		let a = index.wordScores[w];
		if (!a || a.length < n) a = index.wordScores[w] = new Float32Array(Math.max(n, (a?.length ?? 512) * 2));
		const m = matches[w];
		for (let i = 0; i < m.terms.length; i++) a[m.terms[i]] = m.scores[i];
	}
	return index.wordScores;
}

function haystack(index: SearchIndex, doc: number): string {
	let hay = index.hay[doc];
	if (hay === undefined) {
		const r = index.docs[doc]!;
		hay = index.hay[doc] = r.aliases?.length ? `${fold(r.text)} ${r.aliases.map(fold).join(' ')}` : fold(r.text);
	}
	return hay;
}

/** Ranges in `text` for one word, from the record slot it matched best. */
function wordRanges(index: SearchIndex, doc: number, q: QueryWord, m: WordMatches, out: Range[]) {
	const terms = index.docTerms[doc];
	const spans = index.docSpans[doc];
	const text = index.docs[doc]!.text;
	let bestSlot = -1;
	let best = 0;
	for (let s = 0; s < terms.length; s++) {
		const v = m.byTerm.get(terms[s]) ?? 0;
		// Prefer a slot in the text over an alias of equal worth: only the text can be highlighted directly.
		if (v > best || (v === best && v > 0 && spans[s * 2] >= 0 && bestSlot >= 0 && spans[bestSlot * 2] < 0)) {
			best = v;
			bestSlot = s;
		}
	}
	if (bestSlot < 0) return;
	const term = index.terms[terms[bestSlot]];
	const start = spans[bestSlot * 2];
	const end = spans[bestSlot * 2 + 1];
	const at = term.indexOf(q.word);
	if (start >= 0) {
		// Folding can change a token's length (ß, combining accents); then only the whole token maps back safely.
		if (at < 0 || end - start !== term.length) out.push([start, end]);
		else out.push([start + at, start + at + q.word.length]);
		return;
	}
	// An alias of digits (phone, size) is the text's digits with the punctuation taken out: find them there.
	if (at < 0 || !/^\d+$/.test(q.word)) return;
	const positions: number[] = [];
	let digits = '';
	for (let i = 0; i < text.length; i++) {
		const c = text.charCodeAt(i);
		if (c >= 48 && c <= 57) {
			positions.push(i);
			digits += text[i];
		}
	}
	const found = digits.indexOf(q.word);
	if (found >= 0) out.push([positions[found], positions[found + q.word.length - 1] + 1]);
}

function mergeRanges(ranges: Range[]): Range[] {
	ranges.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
	const out: Range[] = [];
	for (const r of ranges) {
		const last = out[out.length - 1];
		if (last && r[0] <= last[1]) last[1] = Math.max(last[1], r[1]);
		else out.push([r[0], r[1]]);
	}
	return out;
}

/**
 * Ranked hits for what the writer typed. An empty query returns nothing: the palette shows recent items then.
 * Every word must match some token of a hit (typos, dropped letters and adjacent swaps forgiven), in any order.
 */
export function search(index: SearchIndex, query: string, limit = 20): SearchHit[] {
	const seen = new Set<string>();
	const words: QueryWord[] = [];
	for (const t of tokenize(query)) {
		if (seen.has(t.term)) continue;
		seen.add(t.term);
		words.push(queryWord(t.term));
		if (words.length === 8) break;
	}
	if (words.length === 0 || limit <= 0) return [];
	const matches = words.map((q) => matchWord(index, q));
	if (matches.some((m) => m.terms.length === 0)) return [];

	const gathered = filter(index, words, matches);
	gathered.sort((a, b) => b.score - a.score || b.doc - a.doc);
	const candidates = gathered.slice(0, CANDIDATES);
	if (candidates.length === 0) return [];

	let ranked: { c: Candidate; score: number }[];
	if (words.some((q) => q.mode === 'fuzzy')) {
		const fuse = new Fuse(
			candidates.map((c) => haystack(index, c.doc)),
			{ useExtendedSearch: true, threshold: 0.3, ignoreLocation: true, includeScore: true }
		);
		const fuseQuality = new Float64Array(candidates.length).fill(FUSE_MISS);
		for (const r of fuse.search(words.map((q) => q.word).join(' '))) fuseQuality[r.refIndex] = 1 - (r.score ?? 1);
		ranked = candidates.map((c, i) => ({ c, score: 0.5 * fuseQuality[i] + 0.5 * c.score }));
		// Fuse scores tie on shared prefixes; the filter's score, then recency, decide those.
		ranked.sort((a, b) => b.score - a.score || b.c.score - a.c.score || b.c.doc - a.c.doc);
	} else {
		// Only prefixes and digit fragments, which every candidate holds exactly: fuse.js would score them all alike
		// (the candidates' order already breaks such ties), so skip it; over a thousand short prefixes it was half
		// the search's time.
		ranked = candidates.map((c) => ({ c, score: 0.5 + 0.5 * c.score }));
	}

	return ranked.slice(0, limit).map(({ c, score }) => {
		const r = index.docs[c.doc]!;
		const ranges: Range[] = [];
		words.forEach((q, w) => wordRanges(index, c.doc, q, matches[w], ranges));
		return { id: r.id, kind: r.kind, score: Math.round(score * 1e4) / 1e4, ranges: mergeRanges(ranges) };
	});
}

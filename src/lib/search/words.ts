/**
 * How one query word is allowed to match one indexed term, and how well. The candidate walk in index.ts only proposes
 * terms; `termScore` alone decides, so the posting shortcuts can never let in a term this function would refuse.
 */
import { hasDigit, osaDistance, termGrams, termHasGram } from './text';

export type WordMode = 'prefix' | 'substring' | 'fuzzy';

export interface QueryWord {
	word: string;
	mode: WordMode;
	/** Grams counted for fuzzy words; the single-letter anchor is left out because it is in a twentieth of all terms. */
	grams: string[];
	/** How many of `grams` a term must hold to pass on overlap alone: about half, which forgives a typo or a drop. */
	need: number;
	maxEdits: number;
}

export function queryWord(word: string): QueryWord {
	// Plates, phones, job numbers and sizes are typed as fragments from anywhere in the number, so digits match as
	// substrings; a short alphabetic word is too short to tell a typo from another word, so it must be a prefix.
	const mode: WordMode =
		word.length === 1 ? 'prefix' : hasDigit(word) ? 'substring' : word.length < 4 ? 'prefix' : 'fuzzy';
	const grams = mode === 'fuzzy' ? termGrams(word).filter((g) => !(g[0] === '^' && g.length === 2)) : [];
	return {
		word,
		mode,
		grams,
		need: Math.ceil(grams.length / 2),
		maxEdits: word.length >= 7 ? 2 : 1
	};
}

function prefixScore(w: string, term: string): number {
	return 0.85 + 0.1 * (w.length / term.length);
}

/** 0 when the word does not match the term; otherwise higher is better, 1 for the term itself. */
export function termScore(q: QueryWord, term: string): number {
	const w = q.word;
	if (term === w) return 1;
	if (term.startsWith(w)) return prefixScore(w, term);
	if (q.mode === 'prefix') {
		// Three letters are enough to catch a slip like `opn` for `open`, kept well below a real prefix.
		if (w.length !== 3 || hasDigit(w) || term[0] !== w[0]) return 0;
		const d = Math.min(osaDistance(w, term.slice(0, 3), 1), osaDistance(w, term.slice(0, 4), 1));
		return d <= 1 ? 0.5 : 0;
	}
	if (q.mode === 'substring') {
		return term.includes(w) ? 0.6 + 0.2 * (w.length / term.length) : 0;
	}
	let shared = 0;
	for (const g of q.grams) if (termHasGram(term, g)) shared++;
	let score = shared >= q.need ? 0.3 + 0.4 * (shared / q.grams.length) : 0;
	// A hurried writer types the start of a word; compare against the term's start at the typed length (±1 for a
	// dropped or doubled letter) as well as the whole term.
	if (term.length >= w.length - q.maxEdits && (term[0] === w[0] || term[0] === w[1])) {
		let d = q.maxEdits + 1;
		for (let len = w.length - 1; len <= w.length + 1 && d > 0; len++) {
			if (len > term.length) break;
			d = Math.min(d, osaDistance(w, term.slice(0, len), q.maxEdits));
		}
		if (d <= q.maxEdits) score = Math.max(score, 0.78 - 0.12 * d);
	}
	return score;
}

/** Grams to walk so that every term `termScore` could accept is proposed at least once. */
export function candidateGrams(q: QueryWord): string[] {
	const w = q.word;
	if (q.mode === 'prefix') return ['^' + w.slice(0, w.length === 3 ? 1 : 2)];
	if (q.mode === 'substring') {
		// Any one gram of the word is held by every term containing it; the caller walks the rarest.
		const n = w.length >= 3 ? 3 : 2;
		const out: string[] = [];
		for (let i = 0; i + n <= w.length; i++) out.push(w.slice(i, i + n));
		return out;
	}
	// The single letters catch swaps such as `lria` for `lira`, which share no longer gram with their term.
	return [...q.grams, '^' + w[0], '^' + w[1]];
}

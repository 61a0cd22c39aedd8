/**
 * Text handling shared by the index and the query side: the same folding and tokenising on both, or a word could never
 * meet its own token.
 */

export interface Token {
	/** Folded (lower-case, accents removed) token. */
	term: string;
	/** Offsets in the original text, or -1 when the token comes from an alias. */
	start: number;
	end: number;
}

const TOKEN = /[\p{L}\p{N}]+/gu;
const MARKS = /\p{M}/gu;
const DIGIT = /\d/;

export function fold(s: string): string {
	const lower = s.toLowerCase();
	// Only pay for NFD when there is something outside ASCII to fold.
	// eslint-disable-next-line no-control-regex
	return /^[\x00-\x7f]*$/.test(lower) ? lower : lower.normalize('NFD').replace(MARKS, '');
}

export function tokenize(text: string, fromAlias = false): Token[] {
	const out: Token[] = [];
	for (const m of text.matchAll(TOKEN)) {
		const term = fold(m[0]);
		if (!term) continue;
		const start = fromAlias ? -1 : m.index;
		out.push({ term, start, end: fromAlias ? -1 : m.index + m[0].length });
	}
	return out;
}

export function hasDigit(s: string): boolean {
	return DIGIT.test(s);
}

/**
 * The grams a term is indexed under: its first letter and first two letters (anchored with `^`, so prefixes are cheap
 * to find), every bigram and every trigram.
 */
export function termGrams(term: string): string[] {
	const grams = new Set<string>();
	grams.add('^' + term[0]);
	if (term.length > 1) grams.add('^' + term.slice(0, 2));
	for (let i = 0; i + 2 <= term.length; i++) grams.add(term.slice(i, i + 2));
	for (let i = 0; i + 3 <= term.length; i++) grams.add(term.slice(i, i + 3));
	return [...grams];
}

/** A gram of `word` is present in `term` in the same sense termGrams would have indexed it. */
export function termHasGram(term: string, gram: string): boolean {
	return gram[0] === '^' ? term.startsWith(gram.slice(1)) : term.includes(gram);
}

/**
 * Optimal string alignment distance (Levenshtein plus adjacent swaps), abandoned once it must exceed `max`. A swap
 * costs one here; gram overlap and fuse.js both count it as two errors, which is why `ldoun` used to miss `lodun`.
 */
export function osaDistance(a: string, b: string, max: number): number {
	const n = a.length;
	const m = b.length;
	if (Math.abs(n - m) > max) return max + 1;
	let prev2 = new Array<number>(m + 1).fill(0);
	let prev = new Array<number>(m + 1);
	let cur = new Array<number>(m + 1);
	for (let j = 0; j <= m; j++) prev[j] = j;
	for (let i = 1; i <= n; i++) {
		cur[0] = i;
		let rowMin = i;
		for (let j = 1; j <= m; j++) {
			const cost = a.charCodeAt(i - 1) === b.charCodeAt(j - 1) ? 0 : 1;
			let v = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
			if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) v = Math.min(v, prev2[j - 2] + 1);
			cur[j] = v;
			if (v < rowMin) rowMin = v;
		}
		if (rowMin > max) return max + 1;
		[prev2, prev, cur] = [prev, cur, prev2];
	}
	return prev[m];
}

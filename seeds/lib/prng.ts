// A seeded random source for the seeds: the same seed gives the same data on every machine and every run,
// which is what lets a second run find the rows the first one wrote (and tests compare counts).

/** mulberry32: 32 bits of state, fast, and good enough for invented demo data (not for anything secret). */
export function mulberry32(seed: number): () => number {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

export class Rng {
	readonly next: () => number;
	readonly seed: number;

	constructor(seed: number) {
		this.seed = seed >>> 0;
		this.next = mulberry32(this.seed);
	}

	/** A whole number from min to max, both included. */
	int(min: number, max: number): number {
		return min + Math.floor(this.next() * (max - min + 1));
	}

	between(min: number, max: number): number {
		return min + this.next() * (max - min);
	}

	chance(p: number): boolean {
		return this.next() < p;
	}

	pick<T>(items: readonly T[]): T {
		if (items.length === 0) throw new RangeError('pick needs at least one item');
		return items[Math.floor(this.next() * items.length)];
	}

	/** Picks by relative weight, e.g. [['white', 5], ['red', 1]]. */
	weighted<T>(items: readonly (readonly [T, number])[]): T {
		const total = items.reduce((sum, [, w]) => sum + w, 0);
		let roll = this.next() * total;
		for (const [item, w] of items) {
			roll -= w;
			if (roll < 0) return item;
		}
		return items[items.length - 1][0];
	}

	shuffle<T>(items: T[]): T[] {
		for (let i = items.length - 1; i > 0; i--) {
			const j = Math.floor(this.next() * (i + 1));
			[items[i], items[j]] = [items[j], items[i]];
		}
		return items;
	}

	/**
	 * A separate stream named by `label`, derived from the seed alone (not from draws made so far), so a step a
	 * second run skips does not change what the steps after it invent.
	 */
	fork(label: string): Rng {
		let h = 2166136261 ^ this.seed;
		for (const ch of label) h = Math.imul(h ^ ch.charCodeAt(0), 16777619);
		return new Rng(Math.imul(h ^ (h >>> 16), 0x45d9f3b) >>> 0);
	}
}

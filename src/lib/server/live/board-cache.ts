// The board snapshot of each store, kept by this instance until the store's next event (or 30 s, for the day's
// counters). A screen that loads the board gets a snapshot and its cursor; even a snapshot a moment behind is
// consistent with its own cursor, and the stream replays whatever came after it. The cache is only a copy of what
// PostgreSQL says: dropping it changes nothing but speed.
import type { BoardSnapshot } from '$lib/schemas/floor';
import * as board from '../db/board';
import { onAnyEvent } from './hub';
import { ensureStarted, state } from './listener';

const TTL_MS = 30_000;
const cache = new Map<number, { snapshot: BoardSnapshot; json: string; builtAt: number }>();
const generation = new Map<number, number>();
let wired = false;

function wire() {
	if (wired) return;
	wired = true;
	onAnyEvent((storeId) => {
		cache.delete(storeId);
		generation.set(storeId, (generation.get(storeId) ?? 0) + 1);
	});
}

/** The snapshot for a page load (the console renders it); the same copy the API serves. */
export async function snapshot(storeId: number): Promise<BoardSnapshot> {
	return (await entry(storeId)).snapshot;
}

/** The snapshot as the API sends it. */
export async function snapshotJson(storeId: number): Promise<string> {
	return (await entry(storeId)).json;
}

async function entry(storeId: number): Promise<{ snapshot: BoardSnapshot; json: string }> {
	wire();
	await ensureStarted().catch(() => {});
	const build = async () => {
		const fresh = await board.snapshot(storeId);
		return { snapshot: fresh, json: JSON.stringify(fresh) };
	};
	// Without a live LISTEN connection nothing would tell us the floor changed: read from the database every time.
	if (!state().connected) return build();
	const hit = cache.get(storeId);
	if (hit && Date.now() - hit.builtAt < TTL_MS) return hit;
	const before = generation.get(storeId) ?? 0;
	const built = await build();
	// An event arrived while we read: this snapshot is still consistent with its cursor, but do not keep it.
	if ((generation.get(storeId) ?? 0) === before) cache.set(storeId, { ...built, builtAt: Date.now() });
	return built;
}

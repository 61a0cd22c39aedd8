// Open streams end when their session does: one query every few seconds for all streams of this instance checks
// that each user is still active with the same session version (disabled, role-reset or signed out elsewhere).
import * as users from '../db/users';

interface Watched {
	userId: number;
	sessionVersion: number;
	end: () => void;
}

const CHECK_MS = 5_000;
const watched = new Set<Watched>();
let timer: ReturnType<typeof setInterval> | null = null;

export function watch(entry: Watched): () => void {
	watched.add(entry);
	timer ??= setInterval(() => void check(), CHECK_MS);
	timer.unref();
	return () => {
		watched.delete(entry);
		if (watched.size === 0 && timer) {
			clearInterval(timer);
			timer = null;
		}
	};
}

export async function check(): Promise<void> {
	if (watched.size === 0) return;
	const ids = [...new Set([...watched].map((w) => w.userId))];
	let current: Map<number, { active: boolean; sessionVersion: number }>;
	try {
		current = new Map((await users.readManyForSession(ids)).map((u) => [u.id, u]));
	} catch {
		return; // the database is away: keep the streams; the next check decides
	}
	for (const w of watched) {
		const u = current.get(w.userId);
		if (!u || !u.active || u.sessionVersion !== w.sessionVersion) w.end();
	}
}

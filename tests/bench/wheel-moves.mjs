// Wheel moves through the API: PATCH /api/wheels/:id { version, bayId } (version check, queue renumbering, the
// events row and its NOTIFY, all in one transaction), from several concurrent clients signed in as a lead.
//
// Run alone against running instances (the bench data set: node scripts/seed-bench.mjs):
//   BENCH_URL_A=http://127.0.0.1:3401 node tests/bench/wheel-moves.mjs
// Settings (environment):
//   BENCH_URL_A          the instance the moves go to (default http://127.0.0.1:3401)
//   BENCH_EMAIL          a lead or manager of the bench store (default lead01@bench.lugline.test), BENCH_PASSWORD
//   BENCH_CLIENTS        concurrent clients (default 8; at most 12, since each needs two bays of its own)
//   BENCH_SECONDS        measured duration (default 10), after BENCH_WARMUP_SECONDS (default 2) not counted
//   BENCH_MAX_MOVES      a hard cap on measured moves over all clients (default 20000)
//   BENCH_MID_SECONDS    a second, shorter phase moving into the middle of a queue (default 3; 0 skips it)
//
// Method: each client owns two bays and one queued wheel (the last one in the first bay) and moves it back and forth
// with the version from the previous answer, so no client ever races another one: a 409 here means a bug, and is
// counted. Main phase: to the end of the other bay's queue (a lead's "send it to bay 7"). Mid phase: to the middle
// of the other bay's queue, which renumbers the wheels behind it. One request in flight per client, back to back.
// At the end every wheel goes back to its bay and place, so the bench data keeps its shape between runs.
import { assertLoopback, heading, json, leadEmail, ms, signIn, sleep, summary, urlA, verdict } from './lib.mjs';

const clients = Number(process.env.BENCH_CLIENTS ?? 8);
const seconds = Number(process.env.BENCH_SECONDS ?? 10);
const warmupSeconds = Number(process.env.BENCH_WARMUP_SECONDS ?? 2);
const maxMoves = Number(process.env.BENCH_MAX_MOVES ?? 20_000);
const midSeconds = Number(process.env.BENCH_MID_SECONDS ?? 3);

assertLoopback(urlA);
const cookie = await signIn(urlA, leadEmail);
const board = await json('GET', `${urlA}/api/board`, { cookie });
if (board.status !== 200) throw new Error(`GET /api/board answered ${board.status}`);
// The snapshot sends each wheel once and the bays refer to them by id, in queue order.
const wheelById = new Map(board.body.wheels.map((w) => [w.id, w]));
const bays = board.body.bays
	.filter((b) => b.active)
	.map((b) => ({ ...b, wheels: b.wheelIds.map((id) => wheelById.get(id)) }));
if (bays.length < clients * 2)
	throw new Error(`${clients} clients need ${clients * 2} active bays; the board has ${bays.length}`);

const movers = [];
for (let i = 0; i < clients; i++) {
	const [from, to] = [bays[2 * i], bays[2 * i + 1]];
	const queued = from.wheels.filter((w) => w.state === 'queued');
	if (queued.length === 0) throw new Error(`bay ${from.code} has no queued wheel to move`);
	const wheel = queued[queued.length - 1];
	movers.push({
		wheelId: wheel.id,
		version: wheel.version,
		home: { bayId: from.id, queuePosition: wheel.queuePosition },
		bays: [from.id, to.id],
		// Queue length of each bay without the moving wheel, for the mid-queue phase.
		lengths: { [from.id]: from.wheels.length - 1, [to.id]: to.wheels.length },
		at: 0
	});
}

let failures = 0;

async function moveOnce(m, mid) {
	const target = m.bays[1 - m.at];
	const body = { version: m.version, bayId: target };
	if (mid) body.queuePosition = Math.max(1, Math.floor(m.lengths[target] / 2));
	const started = performance.now();
	const r = await json('PATCH', `${urlA}/api/wheels/${m.wheelId}`, { cookie, body });
	const elapsed = performance.now() - started;
	if (r.status === 200) {
		m.version = r.body.wheels.find((w) => w.id === m.wheelId).version;
		m.at = 1 - m.at;
	} else if (r.status === 409) {
		m.version = r.body.current.wheels.find((w) => w.id === m.wheelId).version;
	}
	return { status: r.status, elapsed };
}

/** Every client back to back until the phase ends; returns the latencies of the moves started in the window. */
async function phase(label, { warmup, duration, mid }) {
	const counts = { conflict: 0, other: 0, otherStatuses: new Map() };
	const latencies = [];
	const begin = performance.now();
	const measureFrom = begin + warmup * 1000;
	const end = measureFrom + duration * 1000;
	let measuredStart = Infinity;
	let measuredEnd = 0;
	let stop = false;
	await Promise.all(
		movers.map(async (m) => {
			while (!stop && performance.now() < end) {
				const sentAt = performance.now();
				const { status, elapsed } = await moveOnce(m, mid);
				if (sentAt < measureFrom) continue;
				measuredStart = Math.min(measuredStart, sentAt);
				measuredEnd = Math.max(measuredEnd, sentAt + elapsed);
				if (status === 200) {
					latencies.push(elapsed);
				} else if (status === 409) counts.conflict++;
				else {
					counts.other++;
					counts.otherStatuses.set(status, (counts.otherStatuses.get(status) ?? 0) + 1);
				}
				if (latencies.length >= maxMoves || counts.other > 50) stop = true;
			}
		})
	);
	const wall = (measuredEnd - measuredStart) / 1000;
	const s = summary(latencies);
	heading(`wheel moves (${label}) — PATCH /api/wheels/:id on ${urlA}`);
	console.log(
		`method: ${clients} concurrent clients, one request in flight each, ${warmup} s warm-up not counted, then ${duration} s ` +
			`(measured ${wall.toFixed(2)} s); latency = request sent → answer read, in the client; nearest-rank percentiles`
	);
	console.log(
		`moves: ${s.n} ok, ${counts.conflict} × 409, ${counts.other} other${counts.other ? ` (${[...counts.otherStatuses].map(([k, v]) => `${v} × ${k}`).join(', ')})` : ''}`
	);
	console.log(`latency: p50 ${ms(s.p50)}, p90 ${ms(s.p90)}, p99 ${ms(s.p99)}, max ${ms(s.max)}`);
	console.log(`throughput: ${(s.n / wall).toFixed(0)} moves/s`);
	failures += counts.conflict + counts.other;
	return { ...s, perSecond: s.n / wall };
}

let main;
try {
	main = await phase('to the end of a queue', { warmup: warmupSeconds, duration: seconds, mid: false });
	console.log(
		`targets: p50 ≤ 5 ms ${verdict(main.p50, 5)}, p99 ≤ 20 ms ${verdict(main.p99, 20)}, ≥ 500 moves/s ${verdict(main.perSecond, 500, false)}`
	);
	if (midSeconds > 0) {
		await sleep(200);
		await phase('into the middle of a queue', { warmup: 0.5, duration: midSeconds, mid: true });
		console.log('(no target for this case; it shows the cost of renumbering the wheels behind the new place)');
	}
} finally {
	// Put every wheel back where the data set had it.
	let restored = 0;
	for (const m of movers) {
		const r = await json('PATCH', `${urlA}/api/wheels/${m.wheelId}`, {
			cookie,
			body: { version: m.version, bayId: m.home.bayId, queuePosition: m.home.queuePosition }
		});
		if (r.status === 200) restored++;
		else console.error(`could not put wheel ${m.wheelId} back (${r.status}): ${r.text.slice(0, 200)}`);
	}
	console.log(`restored ${restored}/${movers.length} wheels to their bays and places`);
}
if (failures > 0) process.exitCode = 1;

// Change-to-screen across two instances: open screens (event streams) split over instances A and B, one writer
// moving a wheel through A, and the time from the writer sending its request to each screen holding the matching
// `floor` event. That span covers the whole path: the API and its transaction, the commit, NOTIFY to both
// instances' LISTEN connections, each instance reading the row and fanning it out, and the bytes reaching the screen.
//
// Run alone against two running instances on the same bench database (node scripts/seed-bench.mjs):
//   BENCH_URL_A=http://127.0.0.1:3401 BENCH_URL_B=http://127.0.0.1:3402 node tests/bench/live-fanout.mjs
// Settings (environment):
//   BENCH_URL_A, BENCH_URL_B   the two instances (defaults :3401 and :3402); the writer uses A
//   BENCH_PID_A, BENCH_PID_B   their process ids, for memory; found from the listening port through /proc if unset
//   BENCH_SCREENS              open streams, split evenly over A and B (default 1000)
//   BENCH_CHANGES              wheel moves made by the writer (default 80), spaced 50–100 ms apart
//   BENCH_EMAIL                the writer, a lead (default lead01@bench.lugline.test); BENCH_PASSWORD
//
// Method: the screens belong to all 33 bench staff (each signs in once through the real form on each instance);
// each opens POST /api/events with { cursor } from GET /api/board and the changes start only once every stream has
// sent `ready`. A first tenth of the screens and 4 moves come first, unmeasured. The writer sends one move at a time (the next one 50–100 ms after the previous send, seeded, or
// after its answer if that is later). Every floor event is matched to the writer's change by the moved wheel's id
// and new version. Timestamps come from one clock in this process; each screen's time is taken when the chunk
// completing the event is read. This process also parses 1,000 streams on the same two cores as the servers: its
// own event-loop delay is printed so a reader can tell how much of the tail is the client's. Memory: VmRSS of each
// instance before its first stream, after the first tenth and after all; per screen both over all its screens (the
// issue's figure) and beyond the first tenth (the marginal cost, without code loading and first-use caches).
import http from 'node:http';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import {
	assertLoopback,
	benchStaff,
	heading,
	instancePid,
	json,
	leadEmail,
	ms,
	mulberry32,
	rssKiB,
	signIn,
	sleep,
	summary,
	urlA,
	urlB,
	verdict
} from './lib.mjs';

const screens = Number(process.env.BENCH_SCREENS ?? 1000);
const changes = Number(process.env.BENCH_CHANGES ?? 80);
const openConcurrency = 32;
const readyTimeoutMs = 90_000;
const drainMs = 5_000;

for (const u of [urlA, urlB]) assertLoopback(u);
const pids = { A: instancePid(urlA, 'BENCH_PID_A'), B: instancePid(urlB, 'BENCH_PID_B') };
const urls = { A: urlA, B: urlB };

// ------------------------------------------------------------------ sign-ins and the writer's wheel

const staff = benchStaff();
const cookies = { A: [], B: [] };
for (const side of ['A', 'B']) for (const email of staff) cookies[side].push(await signIn(urls[side], email));
const writerCookie = await signIn(urlA, leadEmail);

const board = await json('GET', `${urlA}/api/board`, { cookie: writerCookie });
if (board.status !== 200) throw new Error(`GET /api/board answered ${board.status}`);
const cursor = board.body.cursor;
// The snapshot sends each wheel once and the bays refer to them by id, in queue order.
const wheelById = new Map(board.body.wheels.map((w) => [w.id, w]));
const active = board.body.bays
	.filter((b) => b.active)
	.map((b) => ({ ...b, wheels: b.wheelIds.map((id) => wheelById.get(id)) }));
// The last two bays: the wheel-moves bench uses the first ones, so a run after it finds its wheels back home.
const [bayX, bayY] = active.slice(-2);
const queued = bayX.wheels.filter((w) => w.state === 'queued');
if (!queued.length) throw new Error(`bay ${bayX.code} has no queued wheel to move`);
const wheel = queued[queued.length - 1];
const home = { bayId: bayX.id, queuePosition: wheel.queuePosition };

// ------------------------------------------------------------------ screens

/** One open stream, parsed by hand: it only needs event names and the id that opens each floor event's data. */
function openScreen(side, cookie) {
	const screen = { side, arrivals: new Map(), ready: false, status: 0, problem: null, req: null };
	screen.opened = new Promise((resolve) => {
		const body = JSON.stringify({ cursor });
		const req = http.request(
			`${urls[side]}/api/events`,
			{
				method: 'POST',
				agent: false,
				headers: {
					origin: urls[side],
					cookie,
					'content-type': 'application/json',
					'content-length': Buffer.byteLength(body)
				}
			},
			(res) => {
				screen.status = res.statusCode;
				if (res.statusCode !== 200) {
					screen.problem = `HTTP ${res.statusCode}`;
					res.resume();
					return resolve();
				}
				res.setEncoding('utf8');
				let buffer = '';
				res.on('data', (chunk) => {
					const at = performance.now();
					buffer += chunk;
					let cut;
					while ((cut = buffer.indexOf('\n\n')) >= 0) {
						const block = buffer.slice(0, cut);
						buffer = buffer.slice(cut + 2);
						const e = block.indexOf('\nevent: ');
						const d = block.indexOf('\ndata: ');
						const name = block.slice(e + 8, d < 0 ? undefined : d);
						if (name === 'floor') {
							const data = block.slice(d + 7);
							const id = Number.parseInt(data.slice(6), 10); // data is {"id":N,...}
							screen.arrivals.set(id, at);
							if (!rawEvents.has(id)) rawEvents.set(id, data);
						} else if (name === 'ready') {
							screen.ready = true;
							resolve();
						} else if (name === 'resync' || name === 'signed_out') {
							screen.problem = name;
							resolve();
						}
					}
				});
				res.on('close', () => {
					if (!screen.closing) screen.problem ??= 'closed by the server';
					resolve();
				});
			}
		);
		req.on('error', (error) => {
			if (!screen.closing) screen.problem = error.message;
			resolve();
		});
		req.end(body);
		screen.req = req;
	});
	return screen;
}

const rawEvents = new Map();
const list = [];
let next = 0;
/** Opens screens up to index `until`, alternating A and B, a few at a time so sign-in checks do not pile up. */
async function openUpTo(until) {
	const timeout = sleep(readyTimeoutMs).then(() => 'timeout');
	const opening = Promise.all(
		Array.from({ length: openConcurrency }, async () => {
			while (next < until) {
				const i = next++;
				const side = i % 2 === 0 ? 'A' : 'B';
				const s = openScreen(side, cookies[side][Math.floor(i / 2) % staff.length]);
				list.push(s);
				await s.opened;
			}
		})
	);
	if ((await Promise.race([opening, timeout])) === 'timeout')
		console.error(`not every stream was ready after ${readyTimeoutMs / 1000} s`);
}
const countOpen = (side) => list.filter((x) => x.side === side && x.ready && !x.problem).length;

const rssBefore = { A: rssKiB(pids.A), B: rssKiB(pids.B) };
// A first tenth of the screens and a few moves, not measured, so code loading and first-use caches are in the
// baseline of the per-screen memory figure instead of being charged to the screens.
const warmScreens = Math.floor(screens / 10);
await openUpTo(warmScreens);
const rng = mulberry32(20261202);
let version = wheel.version;
let at = 0; // 0: in bay X, 1: in bay Y
async function move() {
	const r = await json('PATCH', `${urlA}/api/wheels/${wheel.id}`, {
		cookie: writerCookie,
		body: { version, bayId: at === 0 ? bayY.id : bayX.id }
	});
	if (r.status === 200) {
		version = r.body.wheels.find((w) => w.id === wheel.id).version;
		at = 1 - at;
	} else if (r.status === 409) version = r.body.current.wheels.find((w) => w.id === wheel.id).version;
	return r.status;
}
for (let k = 0; k < 4; k++) {
	await move();
	await sleep(75);
}
await sleep(500);
const rssBase = { A: rssKiB(pids.A), B: rssKiB(pids.B) };
const warmOpen = { A: countOpen('A'), B: countOpen('B') };
const openStarted = performance.now();
await openUpTo(screens);
const openSeconds = (performance.now() - openStarted) / 1000;
const live = list.filter((s) => s.ready && !s.problem);
const perSide = { A: countOpen('A'), B: countOpen('B') };
await sleep(1000); // let both instances finish the opening burst before reading memory
const rssOpen = { A: rssKiB(pids.A), B: rssKiB(pids.B) };

// ------------------------------------------------------------------ the writer

const sent = [];
let writerFailures = 0;
const loop = monitorEventLoopDelay({ resolution: 1 });
loop.enable();
const writeStarted = performance.now();
for (let k = 0; k < changes; k++) {
	const sentAt = performance.now();
	const status = await move();
	const answeredAt = performance.now();
	if (status === 200) sent.push({ wheelId: wheel.id, version, sentAt, answerMs: answeredAt - sentAt });
	else writerFailures++;
	const wait = sentAt + 50 + rng() * 50 - performance.now();
	if (wait > 0) await sleep(wait);
}
const writeSeconds = (performance.now() - writeStarted) / 1000;
// Wait for the last event to reach every screen (or give up after drainMs).
const drainUntil = performance.now() + drainMs;
const lastKey = sent.length ? `${sent.at(-1).wheelId}:${sent.at(-1).version}` : null;
while (performance.now() < drainUntil) {
	const lastId = [...rawEvents].find(
		([, data]) => lastKey && data.includes(`"id":${wheel.id},`) && eventHasWheel(data, lastKey)
	)?.[0];
	if (lastId !== undefined && live.every((s) => s.arrivals.has(lastId))) break;
	await sleep(50);
}
loop.disable();
const rssAfter = { A: rssKiB(pids.A), B: rssKiB(pids.B) };

function eventHasWheel(data, key) {
	try {
		return JSON.parse(data).wheels.some((w) => `${w.id}:${w.version}` === key);
	} catch {
		return false;
	}
}

// ------------------------------------------------------------------ figures

const eventOf = new Map(); // change key → event id
for (const [id, data] of rawEvents) {
	for (const w of JSON.parse(data).wheels) eventOf.set(`${w.id}:${w.version}`, id);
}
const all = [];
const bySide = { A: [], B: [] };
let delivered = 0;
for (const change of sent) {
	const id = eventOf.get(`${change.wheelId}:${change.version}`);
	for (const s of live) {
		const t = id === undefined ? undefined : s.arrivals.get(id);
		if (t === undefined) continue;
		delivered++;
		all.push(t - change.sentAt);
		bySide[s.side].push(t - change.sentAt);
	}
}
const expected = sent.length * live.length;
const s = summary(all);
const sa = summary(bySide.A);
const sb = summary(bySide.B);
const answers = summary(sent.map((c) => c.answerMs));
const failedScreens = list.filter((x) => !x.ready || x.problem);
const perScreen = (side) => (perSide[side] ? ((rssOpen[side] - rssBefore[side]) / perSide[side]).toFixed(1) : 'n/a');
const marginal = (side) =>
	perSide[side] > warmOpen[side]
		? ((rssOpen[side] - rssBase[side]) / (perSide[side] - warmOpen[side])).toFixed(1)
		: 'n/a';

heading(`live fan-out — writer on ${urlA}; screens on ${urlA} and ${urlB}`);
console.log(
	`method: ${live.length} open screens (${perSide.A} on A, ${perSide.B} on B; a first ${warmScreens} and 4 unmeasured moves, then the rest, ` +
		`${openConcurrency} opening at a time, in ${openSeconds.toFixed(1)} s; all ready before the first measured change), ${sent.length} wheel moves by one writer through A over ${writeSeconds.toFixed(1)} s ` +
		`(50–100 ms apart); latency = writer's request sent → event read on the screen; nearest-rank percentiles over every (change × screen)`
);
if (failedScreens.length) {
	const why = new Map();
	for (const f of failedScreens)
		why.set(f.problem ?? 'not ready in time', (why.get(f.problem ?? 'not ready in time') ?? 0) + 1);
	console.log(
		`screens that did not open: ${failedScreens.length} (${[...why].map(([k, v]) => `${v} × ${k}`).join(', ')})`
	);
}
if (writerFailures) console.log(`writer: ${writerFailures} moves refused`);
console.log(
	`delivered: ${delivered} of ${expected} (${expected ? ((100 * delivered) / expected).toFixed(2) : 'n/a'} %)`
);
console.log(`change-to-screen, all: p50 ${ms(s.p50)}, p90 ${ms(s.p90)}, p99 ${ms(s.p99)}, max ${ms(s.max)}`);
console.log(`  screens on A (same instance as the writer): p50 ${ms(sa.p50)}, p99 ${ms(sa.p99)}, max ${ms(sa.max)}`);
console.log(`  screens on B (the other instance):          p50 ${ms(sb.p50)}, p99 ${ms(sb.p99)}, max ${ms(sb.max)}`);
console.log(
	`writer's own answer (PATCH, the move): p50 ${ms(answers.p50)}, p99 ${ms(answers.p99)}, max ${ms(answers.max)}`
);
const mib = (k) => `${(k / 1024).toFixed(1)} MiB`;
for (const side of ['A', 'B']) {
	if (!pids[side]) {
		console.log(`memory ${side}: pid unknown (set BENCH_PID_${side})`);
		continue;
	}
	console.log(
		`memory ${side} (pid ${pids[side]}, VmRSS): ${mib(rssBefore[side])} before any stream → ${mib(rssBase[side])} with ${warmOpen[side]} open ` +
			`→ ${mib(rssOpen[side])} with ${perSide[side]} open → ${mib(rssAfter[side])} after the changes; ` +
			`${perScreen(side)} KiB per screen over all its screens, ${marginal(side)} KiB per screen beyond the first ${warmOpen[side]}`
	);
}
// The histogram includes the 1 ms timer period itself.
const lag = (ns) => `${Math.max(0, ns / 1e6 - 1).toFixed(1)} ms`;
console.log(
	`this client's own event-loop delay while the changes ran: p50 ${lag(loop.percentile(50))}, p99 ${lag(loop.percentile(99))}, max ${lag(loop.max)}`
);
const worstPerScreen = Math.max(Number(perScreen('A')) || 0, Number(perScreen('B')) || 0); // the issue's figure: all streams, from before the first
console.log(
	`targets: p99 ≤ 100 ms ${verdict(s.p99, 100)}, p50 ≤ 30 ms ${verdict(s.p50, 30)}, ≤ 64 KB per open screen ${verdict(worstPerScreen, 64)}` +
		`${live.length < 1000 ? ` (at ${live.length} screens, not 1,000)` : ''}`
);

// ------------------------------------------------------------------ tidy up

for (const x of list) {
	x.closing = true;
	x.req?.destroy();
}
const back = await json('PATCH', `${urlA}/api/wheels/${wheel.id}`, {
	cookie: writerCookie,
	body: { version, ...home }
});
if (back.status !== 200) console.error(`could not put wheel ${wheel.id} back (${back.status})`);
if (failedScreens.length || writerFailures || delivered < expected) process.exitCode = 1;
// Streams and keep-alive sockets would hold the process open; everything is printed.
setTimeout(() => process.exit(), 100).unref();

// GET /api/board on the bench data set (24 bays, 1,000+ wheels in play): what every screen loads on open and on
// a resync.
//
// Run alone against a running instance (the bench data set: node scripts/seed-bench.mjs):
//   BENCH_URL_A=http://127.0.0.1:3401 node tests/bench/board.mjs
// Settings (environment):
//   BENCH_URL_A            the instance asked (default http://127.0.0.1:3401)
//   BENCH_EMAIL            any bench staff account (default lead01@bench.lugline.test), BENCH_PASSWORD
//   BENCH_BOARD_REQUESTS   measured requests per concurrency level (default 300)
//   BENCH_BOARD_WARMUP     warm-up requests before each level, not counted (default 20)
//   BENCH_BOARD_SECONDS    a time cap per level (default 60): a level ends early, and says so, when it is reached
//
// Method: one signed-in client keeps 1, then 4, requests in flight, back to back, until the count is reached;
// latency = request sent → whole body read, in the client (the body is what a screen has to wait for).
import { assertLoopback, heading, leadEmail, ms, request, signIn, summary, urlA, verdict } from './lib.mjs';

const total = Number(process.env.BENCH_BOARD_REQUESTS ?? 300);
const warmup = Number(process.env.BENCH_BOARD_WARMUP ?? 20);
const capSeconds = Number(process.env.BENCH_BOARD_SECONDS ?? 60);

assertLoopback(urlA);
const cookie = await signIn(urlA, leadEmail);

async function level(concurrency) {
	const get = () => request('GET', `${urlA}/api/board`, { cookie });
	for (let i = 0; i < warmup; i += concurrency) await Promise.all(Array.from({ length: concurrency }, get));

	const latencies = [];
	const sizes = new Set();
	let failed = 0;
	let issued = 0;
	const began = performance.now();
	const deadline = began + capSeconds * 1000;
	let wheels = 0;
	await Promise.all(
		Array.from({ length: concurrency }, async () => {
			while (issued < total && performance.now() < deadline) {
				issued++;
				const t = performance.now();
				const r = await get();
				const elapsed = performance.now() - t;
				if (r.status !== 200) {
					failed++;
					continue;
				}
				latencies.push(elapsed);
				sizes.add(r.bytes);
				if (!wheels) {
					const b = JSON.parse(r.text);
					wheels = b.bays.reduce((n, bay) => n + bay.wheelIds.length, 0);
				}
			}
		})
	);
	const wall = (performance.now() - began) / 1000;
	const s = summary(latencies);
	const size = [...sizes];
	heading(`board — GET /api/board on ${urlA}, ${concurrency} concurrent`);
	console.log(
		`method: ${concurrency} request(s) in flight, ${warmup} warm-up requests not counted, then ${s.n} measured in ${wall.toFixed(2)} s` +
			`${issued < total ? ` (stopped at the ${capSeconds} s cap)` : ''}; nearest-rank percentiles`
	);
	console.log(
		`board: ${wheels} wheels in the bays' queues; response ${(Math.min(...size) / 1024).toFixed(0)} KiB${size.length > 1 ? `–${(Math.max(...size) / 1024).toFixed(0)} KiB` : ''} of JSON, uncompressed${failed ? `; ${failed} failed requests` : ''}`
	);
	console.log(
		`latency: p50 ${ms(s.p50)}, p90 ${ms(s.p90)}, p99 ${ms(s.p99)}, max ${ms(s.max)}; ${(s.n / wall).toFixed(1)} requests/s`
	);
	console.log(`target: p99 ≤ 30 ms ${verdict(s.p99, 30)}`);
	return failed;
}

let failed = 0;
for (const c of [1, 4]) failed += await level(c);
if (failed) process.exitCode = 1;

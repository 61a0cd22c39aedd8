// A week of manager reports over a year of history (issue 8): `npm run seed:bench` writes the year (≈ 250,000 done
// wheels with records, seeds/bench/02-history.ts). Each report is asked through its CSV route, which runs the same
// SQL as the page, for the last full week, 10 times after 2 warm-up requests; then the whole reports page.
//
// Run alone against a running instance on the bench database:
//   BENCH_URL_A=http://127.0.0.1:3401 node tests/bench/reports.mjs
// Settings: BENCH_URL_A, BENCH_MANAGER (default manager01@bench.lugline.test), BENCH_PASSWORD.
import { assertLoopback, heading, ms, request, signIn, summary, urlA, verdict } from './lib.mjs';

const names = ['throughput', 'pace', 'promises', 'waiting', 'force', 'weights', 'ages'];
const day = (offset) => new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10);
const from = day(-8);
const to = day(-1);

assertLoopback(urlA);
const cookie = await signIn(urlA, process.env.BENCH_MANAGER ?? 'manager01@bench.lugline.test');

async function time(url) {
	const started = performance.now();
	const r = await request('GET', url, { cookie });
	if (r.status !== 200) throw new Error(`${url} answered ${r.status}: ${String(r.text).slice(0, 200)}`);
	return performance.now() - started;
}

heading(`reports for ${from} to ${to} (end not included) on ${urlA}`);
for (const name of [...names, 'page']) {
	const url =
		name === 'page'
			? `${urlA}/manage/reports?from=${from}&to=${to}`
			: `${urlA}/api/reports/${name}?from=${from}&to=${to}`;
	for (let i = 0; i < 2; i++) await time(url);
	const times = [];
	for (let i = 0; i < 10; i++) times.push(await time(url));
	const s = summary(times);
	console.log(`${name.padEnd(11)} p50 ${ms(s.p50)}, max ${ms(s.max)} (target < 1 s: ${verdict(s.max, 1000)})`);
}

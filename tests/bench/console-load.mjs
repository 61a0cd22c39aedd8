// The console's first load in Chromium on the bench data set (24 bays, 1,000+ wheels in play, 20,000 vehicles):
// how much JavaScript it loads and how long until it is interactive.
//
// Run alone against a running instance (the bench data set: node scripts/seed-bench.mjs):
//   BENCH_URL_A=http://127.0.0.1:3401 node tests/bench/console-load.mjs
// Settings (environment): BENCH_URL_A, BENCH_EMAIL / BENCH_PASSWORD (a bench lead), BENCH_LOADS (default 10),
// CHROMIUM_PATH (default /usr/bin/chromium).
//
// Method: one signed-in browser context; each round is a fresh page (cold JavaScript parse, warm HTTP cache off)
// navigating to `/`. Times are read in the page from navigation start (performance.timeOrigin):
//   - hydrated: the console's key handlers are bound (a ↓ press selects a job) — measured by pressing ↓ as soon as
//     the page's scripts have run and timing when the focus pane first shows a job;
//   - live: the floor-status strip says `live` (the snapshot is on screen and the event stream is open).
// "Interactive" is the later of the two. JavaScript size: every script the page loads before it is live, gzipped
// here with zlib at level 9 (what the build's precompressed .gz files use), summed.
// Also: the longest task on the main thread during the load (PerformanceObserver 'longtask', ≥ 50 ms only).
import { gzipSync } from 'node:zlib';
import { chromium } from 'playwright';
import { assertLoopback, benchPassword, heading, leadEmail, summary, urlA, verdict } from './lib.mjs';

const loads = Number(process.env.BENCH_LOADS ?? 10);
assertLoopback(urlA);

const browser = await chromium.launch({
	executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
	args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking']
});
const context = await browser.newContext({ viewport: { width: 1920, height: 1080 } });
const signin = await context.newPage();
await signin.goto(`${urlA}/signin`);
await signin.getByLabel('E-mail').fill(leadEmail);
await signin.getByLabel('Password').fill(benchPassword);
await signin.getByRole('button', { name: 'Sign in' }).click();
await signin.getByTestId('connection').waitFor();
await signin.close();

await context.addInitScript(() => {
	const marks = { live: NaN, selected: NaN, longest: 0 };
	Object.defineProperty(window, '__load', { value: marks });
	new PerformanceObserver((list) => {
		for (const e of list.getEntries()) marks.longest = Math.max(marks.longest, e.duration);
	}).observe({ type: 'longtask', buffered: true });
	const watch = new MutationObserver(() => {
		if (Number.isNaN(marks.live) && document.querySelector('[data-testid="connection"][data-state="live"]'))
			marks.live = performance.now();
		if (Number.isNaN(marks.selected) && document.querySelector('[data-testid="focus-job"]'))
			marks.selected = performance.now();
	});
	document.addEventListener('DOMContentLoaded', () => {
		watch.observe(document.body, { subtree: true, childList: true, attributes: true });
		// Press ↓ until the console reacts: the first reaction is when its keys work.
		const poke = () => {
			if (!Number.isNaN(marks.selected)) return;
			for (const type of ['keydown', 'keyup']) {
				const event = new KeyboardEvent(type, { key: 'ArrowDown', code: 'ArrowDown', bubbles: true });
				// hotkeys-js reads keyCode, which a constructed event leaves at 0.
				Object.defineProperty(event, 'keyCode', { get: () => 40 });
				document.dispatchEvent(event);
			}
			setTimeout(poke, 5);
		};
		poke();
	});
});

const rounds = [];
let scriptBytes = null;
for (let i = 0; i < loads; i++) {
	const page = await context.newPage();
	await page.route('**/*', (route) =>
		route.continue({ headers: { ...route.request().headers(), 'cache-control': 'no-cache' } })
	);
	const scripts = new Map();
	page.on('response', async (r) => {
		if (r.request().resourceType() !== 'script') return;
		try {
			scripts.set(r.url(), await r.body());
		} catch {
			// a response without a body (redirect): nothing to count
		}
	});
	await page.goto(`${urlA}/`);
	await page.waitForFunction(() => !Number.isNaN(window.__load.live) && !Number.isNaN(window.__load.selected), null, {
		timeout: 30_000
	});
	const marks = await page.evaluate(() => window.__load);
	rounds.push({ ...marks, interactive: Math.max(marks.live, marks.selected) });
	if (i === 0) {
		scriptBytes = [...scripts.values()].reduce(
			(sum, body) => ({ raw: sum.raw + body.length, gz: sum.gz + gzipSync(body, { level: 9 }).length }),
			{ raw: 0, gz: 0 }
		);
		scriptBytes.files = scripts.size;
	}
	await page.close();
}
await browser.close();

heading(`console first load on the bench data (${urlA}), ${loads} loads`);
console.log(
	`JavaScript: ${scriptBytes.files} files, ${(scriptBytes.raw / 1024).toFixed(1)} KiB raw, ${(scriptBytes.gz / 1024).toFixed(1)} KiB gzipped (target ≤ 200 KB: ${verdict(scriptBytes.gz, 200_000)})`
);
for (const key of ['selected', 'live', 'interactive', 'longest']) {
	const s = summary(rounds.map((r) => r[key]));
	const label = { selected: 'keys work', live: 'stream live', interactive: 'interactive', longest: 'longest task' }[
		key
	];
	console.log(
		`${label.padEnd(13)} p50 ${s.p50.toFixed(0)} ms, max ${s.max.toFixed(0)} ms${key === 'interactive' ? ` (target ≤ 1,000 ms: ${verdict(s.p50, 1000)} at p50, ${verdict(s.max, 1000)} at max)` : ''}`
	);
}

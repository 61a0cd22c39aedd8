// The palette in Chromium, keystroke to rendered results, against a running build with 25,000 and 100,000 vehicles.
// Run (app already serving, e.g. `npm start`; it signs in as the demo writer, so the demo data must be there):
//   node --import tsx tests/bench/palette-browser.mjs
// BENCH_URL (default http://127.0.0.1:3000) names the app; BENCH_SIZES (default 25000,100000) the vehicle counts;
// BENCH_KEY_DELAY_MS (default 50) the pause between keystrokes; BENCH_TRACE=1 adds pass 3. tsx loads the invented
// data from src/lib/search. Not in run.mjs: that one serves the bench database, which has no demo accounts.
//
// Method. Signs in as the demo writer (seeds/demo-accounts.json) in Debian's Chromium (the args of
// playwright.config.ts) and answers `GET /api/vehicles` itself (context.route, which also sees the worker's fetch)
// with N invented vehicles, so the palette's searchable records are N vehicles plus the demo floor's commands and
// jobs. Per size:
//   1. loads the console, opens the palette (`/`), which starts the vehicle index's fetch, parse and indexing, and
//      records the longest main-thread block (MessageChannel ping loop, below) until the palette reports it ready;
//   2. pass 1 types a fixed list of hurried queries one character at a time (clearing the field between queries)
//      and, in the page, times each keystroke from its keydown's `event.timeStamp` to
//        - "DOM": the MutationObserver callback that sees the palette's `data-results-for` equal the field's value,
//          i.e. commands, jobs and vehicles for that exact query are in the DOM (the targets apply here);
//        - "frame": the requestAnimationFrame callback after that, the frame that paints them;
//      a keystroke overtaken by the next before its own results showed is counted as superseded, not timed;
//   3. pass 2 types the list again with a MessageChannel ping loop running (a message posted to itself as soon as
//      the last one ran; the longest gap between two runs is the longest the page could not run a task of its own)
//      and reports the longest block while typing. The loop keeps the main thread busy, so pass 2's latencies are
//      not the figures. A gap also spans several tasks run back to back and time the thread waited for a core, so it
//      is an upper bound on the longest single task;
//   4. with BENCH_TRACE=1, pass 3 reloads, loads and types again under Chromium's trace (category toplevel, no ping
//      loop) and reports the longest single task the page's main thread ran.
// PerformanceObserver('long-animation-frame') also runs throughout; Chromium only reports frames over 50 ms there.
// The first-load JavaScript is the scripts the console loaded before the palette opened, sized from the build's
// precompressed .gz files (when the build in this checkout is the one being served).
import { existsSync, statSync } from 'node:fs';
import { loadavg } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from '@playwright/test';
import playwrightConfig from '../../playwright.config.ts';
import { hurriedQueries, inventedVehicles, vehicleAnchorIds } from '../../src/lib/search/fixture.ts';
import { account } from '../support/accounts.ts';
import { assertLoopback, heading, percentile, sleep, verdict } from './lib.mjs';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const url = process.env.BENCH_URL ?? 'http://127.0.0.1:3000';
const sizes = (process.env.BENCH_SIZES ?? '25000,100000').split(',').map(Number);
const keyDelay = Number(process.env.BENCH_KEY_DELAY_MS ?? 50);
/** After each query: the last answer and the server's customer search (150 ms debounce) land before the next one. */
const settleMs = 400;
const TARGETS = { 25_000: { p50: 3, p99: 16 }, 100_000: { p99: 50, block: 16 } };
assertLoopback(url);

/** A hurried writer's slips on an invented vehicle's words. */
const swap = (w) => (w.length > 3 ? w[0] + w[2] + w[1] + w.slice(3) : w);
const drop = (w) => (w.length > 4 ? w.slice(0, -2) + w.slice(-1) : w);

/**
 * The fixed list: the fixture's hurried vehicle queries (with their expected vehicle) and 20 more over invented
 * vehicles taken at fixed places in the set (their words are shared by many vehicles, so no expected one).
 */
function queryList() {
	const list = hurriedQueries
		.filter((q) => q.expect in vehicleAnchorIds)
		.map((q) => ({ query: q.query, expect: vehicleAnchorIds[q.expect] }));
	const noise = inventedVehicles(25_000).filter((v) => v.id >= 100);
	for (let i = 0; i < 20; i++) {
		const v = noise[(i * 1237) % noise.length];
		const [years, make, model, trim] = v.label.toLowerCase().split(' ');
		const shapes = [
			`${swap(model)} ${drop(make)}`,
			`${make} ${model} ${years.slice(0, 4)}`,
			`${model} ${v.sizes[0].replace(/\D/g, '')}`,
			`${years.slice(2, 4)} ${model.slice(0, 4)}`,
			`${drop(model)} ${trim}`
		];
		list.push({ query: shapes[i % shapes.length], expect: null });
	}
	return list;
}

/** Runs in the page: the keystroke timing, the ping loop and the long-animation-frame observer. */
function instrument() {
	const b = {
		pending: [],
		samples: [],
		superseded: 0,
		loaf: [],
		openAt: NaN,
		readyAt: NaN,
		ping: null
	};
	window.__bench = b;
	// Notes when each query goes to the vehicle worker and when its answer arrives (the worker answers over a
	// BroadcastChannel), before the app's own listeners, to split the time below.
	const PageWorker = window.Worker;
	window.Worker = class extends PageWorker {
		postMessage(message, ...rest) {
			const last = b.pending[b.pending.length - 1];
			if (message?.type === 'search' && last) last.asked = performance.now() - last.t;
			return super.postMessage(message, ...rest);
		}
	};
	const PageChannel = window.BroadcastChannel;
	window.BroadcastChannel = class extends PageChannel {
		constructor(...args) {
			super(...args);
			this.addEventListener('message', (e) => {
				const last = b.pending[b.pending.length - 1];
				if (e.data?.type !== 'hits' || !last) return;
				last.answer = performance.now() - last.t;
				last.search = e.data.ms;
			});
		}
	};
	let rootEl = null;
	document.addEventListener(
		'keydown',
		(e) => {
			if (e.key === '/' && !(e.target instanceof HTMLInputElement)) b.openAt = e.timeStamp;
			if (e.key.length !== 1 || e.ctrlKey || e.metaKey || e.altKey || !(e.target instanceof HTMLInputElement)) return;
			b.pending.push({
				t: e.timeStamp,
				query: null,
				keydown: performance.now() - e.timeStamp,
				input: NaN,
				asked: NaN,
				search: NaN,
				answer: NaN
			});
		},
		true
	);
	document.addEventListener(
		'input',
		(e) => {
			const last = b.pending[b.pending.length - 1];
			if (last && last.query === null) {
				last.query = e.target.value;
				last.input = performance.now() - last.t;
			}
		},
		true
	);
	// Svelte updates the results and the palette's data-results-for in one flush, so a MutationObserver on that
	// attribute alone fires once everything for the query is in the DOM. It is attached once the palette is open
	// (looked for every 20 ms), so the rest of the page's mutations cost nothing here.
	const seen = (el) => {
		if (Number.isNaN(b.readyAt) && el.getAttribute('data-vehicles') === 'ready') b.readyAt = performance.now();
		if (!b.pending.length) return;
		const shown = el.getAttribute('data-results-for');
		const i = shown === null ? -1 : b.pending.findIndex((p) => p.query === shown);
		if (i < 0) return;
		const now = performance.now();
		const p = b.pending[i];
		b.superseded += i;
		b.pending.splice(0, i + 1);
		const sample = {
			query: p.query,
			dom: now - p.t,
			frame: NaN,
			keydown: p.keydown,
			input: p.input,
			asked: p.asked,
			search: p.search,
			answer: p.answer
		};
		b.samples.push(sample);
		requestAnimationFrame(() => (sample.frame = performance.now() - p.t));
	};
	const observer = new MutationObserver(() => rootEl && seen(rootEl));
	const attach = () => {
		if (!rootEl?.isConnected && (rootEl = document.querySelector('[data-results-for],[data-vehicles]'))) {
			observer.disconnect();
			observer.observe(rootEl, { attributes: true, attributeFilter: ['data-results-for', 'data-vehicles'] });
			seen(rootEl);
		}
		setTimeout(attach, 20);
	};
	attach();
	new PerformanceObserver((list) => {
		for (const e of list.getEntries()) b.loaf.push({ duration: e.duration, blocking: e.blockingDuration });
	}).observe({ type: 'long-animation-frame' });
	b.startPing = () => {
		const channel = new MessageChannel();
		const st = { gaps: [], running: true, last: performance.now() };
		channel.port1.onmessage = () => {
			const now = performance.now();
			if (now - st.last > 16) st.gaps.push({ from: st.last, ms: now - st.last });
			st.last = now;
			if (st.running) channel.port2.postMessage(0);
			else channel.port1.close();
		};
		channel.port2.postMessage(0);
		b.ping = st;
	};
	/** Blocks over 16 ms since startPing; the one holding the keystroke that opened the palette is kept apart. */
	b.stopPing = () => {
		b.ping.running = false;
		// (the ping that ends a gap can run just after the keystroke's timeStamp, before its task)
		const opening = b.ping.gaps.filter((g) => g.from <= b.openAt + 5 && b.openAt <= g.from + g.ms);
		const rest = b.ping.gaps.filter((g) => !opening.includes(g));
		return {
			max: Math.max(0, ...rest.map((g) => g.ms)),
			over16: rest.length,
			opening: Math.max(0, ...opening.map((g) => g.ms)),
			// When each began, from the palette's opening keystroke (the load) or as typed (the typing pass).
			list: rest.map((g) => `${g.ms.toFixed(0)} ms at +${(g.from - b.openAt).toFixed(0)}`)
		};
	};
}

async function signIn(page) {
	const { email, password } = account('writer');
	await page.goto(`${url}/signin`);
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await page.locator('[data-testid="connection"][data-state="live"]').waitFor({ timeout: 30_000 });
}

async function openConsole(page) {
	await page.goto(`${url}/`);
	await page.locator('[data-testid="connection"][data-state="live"]').waitFor({ timeout: 30_000 });
	await page.evaluate(instrument);
}

/** Types the list; returns the timed samples and, for the queries with an expected vehicle, whether it was in the top 3. */
async function typeAll(page, list) {
	const input = page.getByPlaceholder(/Job number, name, phone/);
	let keystrokes = 0;
	let found = 0;
	let expected = 0;
	for (const { query, expect } of list) {
		await input.press('Control+a');
		await input.press('Backspace');
		await sleep(100);
		for (const ch of query) {
			await page.keyboard.type(ch);
			keystrokes++;
			await sleep(keyDelay);
		}
		await page.waitForFunction(
			(q) => document.querySelector('[data-results-for]')?.getAttribute('data-results-for') === q,
			query,
			{ timeout: 10_000 }
		);
		if (expect !== null) {
			expected++;
			const top = await page
				.locator('[data-result^="vehicle:"]')
				.evaluateAll((els) => els.slice(0, 3).map((e) => e.getAttribute('data-result')));
			if (top.includes(`vehicle:${expect}`)) found++;
		}
		await sleep(settleMs);
	}
	const { samples, superseded } = await page.evaluate(() => {
		const b = window.__bench;
		const out = { samples: b.samples.splice(0), superseded: b.superseded };
		b.superseded = 0;
		b.pending.length = 0;
		return out;
	});
	return { samples, superseded, keystrokes, found, expected };
}

function figures(values) {
	const s = Float64Array.from(values.filter(Number.isFinite)).sort();
	const f = (p) => `${percentile(s, p).toFixed(2)}`;
	return {
		p50: percentile(s, 50),
		p99: percentile(s, 99),
		text: `p50 ${f(50)} / p95 ${f(95)} / p99 ${f(99)} / max ${f(100)} ms`
	};
}

async function firstLoadJs(page) {
	const scripts = await page.evaluate(() =>
		performance
			.getEntriesByType('resource')
			.map((e) => e.name)
			.filter((n) => new URL(n).pathname.endsWith('.js'))
	);
	let gz = 0;
	let raw = 0;
	for (const s of scripts) {
		const file = join(root, 'build', 'client', new URL(s).pathname);
		if (!existsSync(`${file}.gz`))
			return `${scripts.length} scripts (not sized: ${new URL(s).pathname} is not in this checkout's build)`;
		gz += statSync(`${file}.gz`).size;
		raw += statSync(file).size;
	}
	return `${scripts.length} scripts, ${(raw / 1024).toFixed(1)} KiB raw, ${(gz / 1024).toFixed(1)} KiB gzipped (build/client/*.gz)`;
}

/**
 * Runs `work` while Chromium traces (category `toplevel` only, which costs little) and returns the durations of the
 * tasks the page's main thread ran meanwhile: Chromium's own account of how long each single task held the thread.
 */
async function mainThreadTasks(work) {
	const cdp = await context.newCDPSession(page);
	const events = [];
	cdp.on('Tracing.dataCollected', (e) => {
		for (const event of e.value) events.push(event);
	});
	const complete = new Promise((done) => cdp.once('Tracing.tracingComplete', done));
	await cdp.send('Tracing.start', { categories: 'toplevel', transferMode: 'ReportEvents' });
	const result = await work();
	await cdp.send('Tracing.end');
	await complete;
	await cdp.detach();
	const threads = new Map();
	for (const e of events) if (e.ph === 'M' && e.name === 'thread_name') threads.set(`${e.pid}:${e.tid}`, e.args.name);
	const byThread = new Map();
	for (const e of events) {
		const thread = `${e.pid}:${e.tid}`;
		if (e.ph !== 'X' || e.name !== 'ThreadControllerImpl::RunTask' || threads.get(thread) !== 'CrRendererMain')
			continue;
		if (!byThread.has(thread)) byThread.set(thread, []);
		byThread.get(thread).push(e.dur / 1000);
	}
	// The page's renderer is the main thread that worked the most.
	const total = (list) => list.reduce((a, b) => a + b, 0);
	const tasks = [...byThread.values()].sort((a, b) => total(b) - total(a))[0] ?? [];
	const longest = tasks.reduce((a, b) => Math.max(a, b), 0);
	return { result, longest, over16: tasks.filter((d) => d > 16).length, count: tasks.length };
}

const { launchOptions } = playwrightConfig.use;
const browser = await chromium.launch({ executablePath: launchOptions.executablePath, args: launchOptions.args });
const context = await browser.newContext({ viewport: { width: 1920, height: 1080 } });
const page = await context.newPage();
// BENCH_QUERIES and BENCH_PASSES=1 shorten a run while trying something; the figures are for the full list, two passes.
const list = queryList().slice(0, Number(process.env.BENCH_QUERIES ?? Infinity));
const passes = Number(process.env.BENCH_PASSES ?? 2);
const started = performance.now();
let failed = false;
try {
	await signIn(page);
	console.log(
		`palette in Chromium ${browser.version()} at ${url}: ${list.length} queries, ` +
			`${list.reduce((n, q) => n + q.query.length, 0)} keystrokes a pass, ${keyDelay} ms apart`
	);
	for (const [i, n] of sizes.entries()) {
		const body = JSON.stringify(inventedVehicles(n));
		let served = 0;
		await context.unrouteAll();
		await context.route('**/api/vehicles', (route) => {
			served++;
			return route.fulfill({ status: 200, contentType: 'application/json', body });
		});
		await openConsole(page);
		heading(
			`${n.toLocaleString('en')} vehicles (${(body.length / 1024 / 1024).toFixed(1)} MB of JSON); ` +
				`load average ${loadavg()
					.map((l) => l.toFixed(1))
					.join(' ')}`
		);
		if (i === 0) console.log(`first-load JavaScript: ${await firstLoadJs(page)}`);

		await page.evaluate(() => window.__bench.startPing());
		await page.keyboard.press('/');
		await page.locator('[data-vehicles="ready"]').waitFor({ timeout: 120_000 });
		const loadBlock = await page.evaluate(() => window.__bench.stopPing());
		const loadMs = await page.evaluate(() => window.__bench.readyAt - window.__bench.openAt);
		if (served !== 1) throw new Error(`GET /api/vehicles was answered by the bench ${served} times, expected once`);
		console.log(
			`index load (fetch and parse in the worker, then index there or on the page): ${loadMs.toFixed(0)} ms from ` +
				`the key that opened the palette; longest main-thread block meanwhile ${loadBlock.max.toFixed(1)} ms ` +
				`(${loadBlock.over16} over 16 ms), not counting the task that opened the palette ` +
				`(${loadBlock.opening ? `${loadBlock.opening.toFixed(1)} ms` : 'under 16 ms'})` +
				(loadBlock.list.length ? `\n  blocks over 16 ms, from the opening keystroke: ${loadBlock.list.join(', ')}` : '')
		);

		const timed = await typeAll(page, list);
		const dom = figures(timed.samples.map((s) => s.dom));
		const frame = figures(timed.samples.map((s) => s.frame));
		const t = TARGETS[n] ?? {};
		const checks = [
			t.p50 !== undefined ? `p50 ${verdict(dom.p50, t.p50)} ≤ ${t.p50} ms` : '',
			t.p99 !== undefined ? `p99 ${verdict(dom.p99, t.p99)} ≤ ${t.p99} ms` : ''
		].filter(Boolean);
		console.log(
			`pass 1, ${timed.samples.length} of ${timed.keystrokes} keystrokes timed (${timed.superseded} superseded):\n` +
				`  keydown → results in the DOM:    ${dom.text}${checks.length ? `  (${checks.join(', ')})` : ''}\n` +
				`  keydown → next animation frame:  ${frame.text}\n` +
				`  where it goes, from the keydown's timeStamp to\n` +
				`    the page's first keydown listener ${figures(timed.samples.map((s) => s.keydown)).text}\n` +
				`    the input event (the browser's own work) ${figures(timed.samples.map((s) => s.input)).text}\n` +
				(timed.samples.some((s) => Number.isFinite(s.answer))
					? `    the query posted to the worker ${figures(timed.samples.map((s) => s.asked)).text}\n` +
						`    its answer handled on the page ${figures(timed.samples.map((s) => s.answer)).text}\n` +
						`    (the search itself, in the worker ${figures(timed.samples.map((s) => s.search)).text})\n`
					: `    (searched on the page: no worker round trip)\n`) +
				`  input event → results in the DOM (the page's own work): ` +
				`${figures(timed.samples.map((s) => s.dom - s.input)).text}\n` +
				`  keydown → DOM for a query's first character (after the field was cleared): ` +
				`${figures(timed.samples.filter((s) => s.query.length === 1).map((s) => s.dom)).text}; for the others: ` +
				`${figures(timed.samples.filter((s) => s.query.length > 1).map((s) => s.dom)).text}\n` +
				`  expected vehicle in the top 3: ${timed.found}/${timed.expected}`
		);

		if (passes < 2) continue;
		await page.evaluate(() => window.__bench.startPing());
		const pinged = await typeAll(page, list);
		const typingBlock = await page.evaluate(() => window.__bench.stopPing());
		const loaf = await page.evaluate(() => window.__bench.loaf);
		const longest = Math.max(loadBlock.max, typingBlock.max);
		console.log(
			`pass 2 (ping loop on): longest main-thread block while typing ${typingBlock.max.toFixed(1)} ms ` +
				`(${typingBlock.over16} over 16 ms)` +
				(t.block !== undefined ? `; load and typing ${verdict(longest, t.block)} ≤ ${t.block} ms` : '') +
				`\n  (a gap in the ping loop spans every task Chromium ran ahead of the ping, back to back: the input, ` +
				`the frame, the answer, and time the thread waited for a core)` +
				`\n  keydown → DOM with the ping loop running: ${figures(pinged.samples.map((s) => s.dom)).text}` +
				`\n  long animation frames (≥ 50 ms) over the whole run: ${loaf.length}` +
				(loaf.length ? `, longest ${Math.max(...loaf.map((l) => l.duration)).toFixed(0)} ms` : '')
		);

		if (!process.env.BENCH_TRACE) continue;
		// Pass 3: the load and the typing again, under Chromium's trace instead of the ping loop.
		await openConsole(page);
		await page.keyboard.press('/');
		const loadTasks = await mainThreadTasks(() =>
			page.locator('[data-vehicles="ready"]').waitFor({ timeout: 120_000 })
		);
		const typingTasks = await mainThreadTasks(() => typeAll(page, list));
		console.log(
			`pass 3 (Chromium's trace, category toplevel): longest single main-thread task while the index loads ` +
				`${loadTasks.longest.toFixed(1)} ms (${loadTasks.over16} of ${loadTasks.count} over 16 ms; from just ` +
				`after the opening task), while typing ${typingTasks.longest.toFixed(1)} ms ` +
				`(${typingTasks.over16} of ${typingTasks.count} over 16 ms)`
		);
	}
} catch (error) {
	console.error(`[palette-browser] ${error instanceof Error ? error.stack : error}`);
	failed = true;
} finally {
	await browser.close();
}
console.log(
	`\nload average ${loadavg()
		.map((l) => l.toFixed(1))
		.join(' ')}; node ${process.version}, total ${((performance.now() - started) / 1000).toFixed(1)} s`
);
process.exit(failed ? 1 : 0);

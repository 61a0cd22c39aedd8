// Shared by the benches in this folder: plain Node.js, no dependencies, so a bench runs with `node` against any
// running build. Mirrors tests/support/instances.ts (real sign-in form, JSON API, the event stream) but over
// node:http: the client's own per-request and per-chunk cost lands inside every figure measured here, and
// node:http costs less CPU than fetch's web streams on a machine whose two cores the servers also need.
import http from 'node:http';
import { readFileSync, readdirSync, readlinkSync } from 'node:fs';

export const urlA = process.env.BENCH_URL_A ?? 'http://127.0.0.1:3401';
export const urlB = process.env.BENCH_URL_B ?? 'http://127.0.0.1:3402';
export const benchPassword = process.env.BENCH_PASSWORD ?? 'bench-staff-1';
export const leadEmail = process.env.BENCH_EMAIL ?? 'lead01@bench.lugline.test';

/** The bench store's staff (seeds/bench/01-bench.ts): screens on the floor belong to many people, not one. */
export function benchStaff() {
	const list = ['manager01'];
	for (let n = 1; n <= 2; n++) list.push(`lead0${n}`);
	for (let n = 1; n <= 6; n++) list.push(`writer0${n}`);
	for (let n = 1; n <= 24; n++) list.push(`tech${String(n).padStart(2, '0')}`);
	return list.map((s) => `${s}@bench.lugline.test`);
}

export function assertLoopback(url) {
	const { hostname } = new URL(url);
	if (hostname !== '127.0.0.1' && hostname !== 'localhost' && hostname !== '::1') {
		throw new Error(`benches run on loopback only; ${url} is not`);
	}
}

// One keep-alive pool for API calls (a screen keeps its connection), unlimited sockets so no request waits for a
// socket inside the client and shows up as server latency.
const apiAgent = new http.Agent({ keepAlive: true, maxSockets: Infinity, maxFreeSockets: 256 });

/** One HTTP exchange. Resolves with status, headers, body text and its size in bytes. */
export function request(method, url, { cookie, body, headers = {}, agent = apiAgent } = {}) {
	const target = new URL(url);
	const payload = body === undefined ? undefined : typeof body === 'string' ? body : JSON.stringify(body);
	const h = { origin: target.origin, ...headers };
	if (cookie) h.cookie = cookie;
	if (payload !== undefined) {
		h['content-type'] ??= 'application/json';
		h['content-length'] = Buffer.byteLength(payload);
	}
	return new Promise((resolve, reject) => {
		const req = http.request(target, { method, headers: h, agent }, (res) => {
			const chunks = [];
			res.on('data', (c) => chunks.push(c));
			res.on('end', () => {
				const buf = Buffer.concat(chunks);
				resolve({ status: res.statusCode, headers: res.headers, text: buf.toString('utf8'), bytes: buf.length });
			});
			res.on('error', reject);
		});
		req.on('error', reject);
		if (payload !== undefined) req.write(payload);
		req.end();
	});
}

export async function json(method, url, options) {
	const r = await request(method, url, options);
	let value = null;
	try {
		value = r.text ? JSON.parse(r.text) : null;
	} catch {
		value = r.text;
	}
	return { ...r, body: value };
}

/** Signs in through the real form action, as a browser would; returns the session cookie. */
export async function signIn(url, email, password = benchPassword) {
	const r = await request('POST', `${url}/signin`, {
		body: new URLSearchParams({ email, password }).toString(),
		headers: { accept: 'text/html', 'content-type': 'application/x-www-form-urlencoded' }
	});
	const cookie = (r.headers['set-cookie'] ?? [])
		.map((c) => c.split(';')[0])
		.find((c) => c.startsWith('authjs.session-token='));
	if (r.status !== 303 || !cookie) {
		throw new Error(
			`sign-in as ${email} at ${url} failed (${r.status}); is the bench data seeded (node scripts/seed-bench.mjs)?`
		);
	}
	return cookie;
}

export async function waitHealthy(url, timeoutMs = 30_000) {
	const deadline = Date.now() + timeoutMs;
	while (Date.now() < deadline) {
		try {
			const r = await request('GET', `${url}/api/health`);
			if (r.status === 200) return;
		} catch {
			// not listening yet
		}
		await sleep(100);
	}
	throw new Error(`${url} did not answer /api/health with 200 within ${timeoutMs / 1000} s`);
}

export const sleep = (ms) => new Promise((r) => setTimeout(r, ms));

// ------------------------------------------------------------------ figures

/** Nearest-rank percentile over an ascending array. */
export function percentile(sorted, p) {
	if (sorted.length === 0) return NaN;
	return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1))];
}

export function summary(values) {
	const s = Float64Array.from(values).sort();
	return {
		n: s.length,
		p50: percentile(s, 50),
		p90: percentile(s, 90),
		p99: percentile(s, 99),
		max: s.length ? s[s.length - 1] : NaN
	};
}

export const ms = (v) => (Number.isFinite(v) ? `${v.toFixed(2)} ms` : 'n/a');

export function verdict(value, limit, atMost = true) {
	if (!Number.isFinite(value)) return 'n/a';
	return (atMost ? value <= limit : value >= limit) ? 'meets' : 'MISSES';
}

export function heading(title) {
	console.log(`\n== ${title}`);
}

// ------------------------------------------------------------------ the instances' processes

/** Resident memory of a process in KiB, from /proc (the figure the per-screen budget is about). */
export function rssKiB(pid) {
	const line = readFileSync(`/proc/${pid}/status`, 'utf8')
		.split('\n')
		.find((l) => l.startsWith('VmRSS:'));
	return line ? Number(line.split(/\s+/)[1]) : NaN;
}

/**
 * The pid listening on a loopback TCP port, found through /proc so a bench can measure instances it did not start.
 * BENCH_PID_A / BENCH_PID_B override it (e.g. when the instances run as another user).
 */
export function pidListeningOn(port) {
	const hexPort = port.toString(16).toUpperCase().padStart(4, '0');
	const inodes = new Set();
	for (const file of ['/proc/net/tcp', '/proc/net/tcp6']) {
		let text = '';
		try {
			text = readFileSync(file, 'utf8');
		} catch {
			continue;
		}
		for (const line of text.split('\n').slice(1)) {
			const f = line.trim().split(/\s+/);
			if (f.length > 9 && f[3] === '0A' && f[1].endsWith(`:${hexPort}`)) inodes.add(f[9]);
		}
	}
	if (inodes.size === 0) return null;
	for (const pid of readdirSync('/proc').filter((d) => /^\d+$/.test(d))) {
		let fds;
		try {
			fds = readdirSync(`/proc/${pid}/fd`);
		} catch {
			continue;
		}
		for (const fd of fds) {
			try {
				const m = /^socket:\[(\d+)\]$/.exec(readlinkSync(`/proc/${pid}/fd/${fd}`));
				if (m && inodes.has(m[1])) return Number(pid);
			} catch {
				// closed meanwhile
			}
		}
	}
	return null;
}

export function instancePid(url, envName) {
	if (process.env[envName]) return Number(process.env[envName]);
	return pidListeningOn(Number(new URL(url).port || 80));
}

// ------------------------------------------------------------------ a tiny seeded PRNG (repeatable runs)

export function mulberry32(seed) {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

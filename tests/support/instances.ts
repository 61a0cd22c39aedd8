// Starts app instances from the build (`node build`) against the tests' database, as production would run them
// behind a load balancer, and talks to them like a screen does: signed-in JSON calls and the event stream.
import { spawn, type ChildProcess } from 'node:child_process';
import { testDatabaseUrl } from './database';

export const testSecret = process.env.AUTH_SECRET ?? 'lugline-test-secret-not-for-production-000000';

/** Photo storage for the instances: what `npm test` passes (its S3 fake), else the tests' fake's defaults. */
export const testS3 = {
	endpoint: process.env.S3_ENDPOINT ?? 'http://127.0.0.1:54359',
	region: process.env.S3_REGION ?? 'us-east-1',
	bucket: process.env.S3_BUCKET ?? 'lugline-photos',
	accessKeyId: process.env.S3_ACCESS_KEY_ID ?? 'S3RVER',
	secretAccessKey: process.env.S3_SECRET_ACCESS_KEY ?? 'S3RVER'
};

/**
 * Customer e-mail for the instances: always a catcher on loopback, never a real mail service whatever SMTP_HOST
 * says (tests must not mail anyone): the tests' catcher that `npm test` starts, unless a test passes its own port.
 */
export const testSmtpPort = Number(process.env.LUGLINE_TEST_SMTP_PORT ?? 54379);

export interface Instance {
	url: string;
	port: number;
	process: ChildProcess;
	/** The instance's log so far: one JSON object per line on its standard output (src/lib/server/log.ts). */
	logs: string[];
}

/** The parsed log entries of an instance (every line must be JSON: a line that is not fails the caller). */
export function logEntries(instance: Instance): Record<string, any>[] {
	return instance.logs.filter((l) => l.startsWith('{')).map((l) => JSON.parse(l));
}

async function healthy(url: string, deadline: number): Promise<void> {
	while (Date.now() < deadline) {
		try {
			const r = await fetch(`${url}/api/health`);
			if (r.status === 200) return;
		} catch {
			// not listening yet
		}
		await new Promise((r) => setTimeout(r, 100));
	}
	throw new Error(`${url} did not become healthy`);
}

/** Starts instances from the build; `env` adds or overrides settings (a test's own catcher port, a faster sender). */
export async function startInstances(
	ports: number[],
	env: Record<string, string> = {},
	{ healthyWithinMs = 30_000 } = {}
): Promise<Instance[]> {
	const instances = ports.map((port) => {
		const url = `http://127.0.0.1:${port}`;
		const child = spawn(process.execPath, ['build'], {
			env: {
				...process.env,
				HOST: '127.0.0.1',
				PORT: String(port),
				ORIGIN: url,
				AUTH_SECRET: testSecret,
				DATABASE_URL: testDatabaseUrl,
				S3_ENDPOINT: testS3.endpoint,
				S3_REGION: testS3.region,
				S3_BUCKET: testS3.bucket,
				S3_ACCESS_KEY_ID: testS3.accessKeyId,
				S3_SECRET_ACCESS_KEY: testS3.secretAccessKey,
				SMTP_HOST: '127.0.0.1',
				SMTP_PORT: String(testSmtpPort),
				SMTP_USER: '',
				SMTP_PASSWORD: '',
				SMTP_SECURE: 'false',
				// A 10 MiB photo plus the multipart framing (adapter-node's default is 512 KB); see scripts/config.mjs.
				BODY_SIZE_LIMIT: process.env.BODY_SIZE_LIMIT ?? String(10 * 1024 * 1024 + 64 * 1024),
				AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true',
				...env
			},
			stdio: ['ignore', 'pipe', 'pipe']
		});
		const logs: string[] = [];
		let partial = '';
		child.stdout?.on('data', (d) => {
			const lines = (partial + String(d)).split('\n');
			partial = lines.pop() ?? '';
			logs.push(...lines);
			if (logs.length > 50_000) logs.splice(0, logs.length - 50_000);
		});
		child.stderr?.on('data', (d) => process.stderr.write(`[instance ${port}] ${String(d)}`));
		return { url, port, process: child, logs };
	});
	const deadline = Date.now() + healthyWithinMs;
	try {
		await Promise.all(instances.map((i) => healthy(i.url, deadline)));
	} catch (error) {
		await stopInstances(instances);
		throw error;
	}
	return instances;
}

export async function stopInstances(instances: Instance[]): Promise<void> {
	await Promise.all(
		instances.map(
			(i) =>
				new Promise<void>((done) => {
					if (i.process.exitCode !== null) return done();
					i.process.once('exit', () => done());
					i.process.kill('SIGTERM');
					setTimeout(() => i.process.kill('SIGKILL'), 5000).unref();
				})
		)
	);
}

/** Signs in through the real form action and returns the session cookie. */
export async function signIn(url: string, email: string, password: string): Promise<string> {
	const response = await fetch(`${url}/signin`, {
		method: 'POST',
		headers: { origin: url, accept: 'text/html', 'content-type': 'application/x-www-form-urlencoded' },
		body: new URLSearchParams({ email, password }),
		redirect: 'manual'
	});
	const cookie = response.headers
		.getSetCookie()
		.map((c) => c.split(';')[0])
		.find((c) => c.startsWith('authjs.session-token='));
	if (response.status !== 303 || !cookie) throw new Error(`sign-in as ${email} failed: ${response.status}`);
	return cookie;
}

export interface Client {
	url: string;
	call(method: string, path: string, body?: unknown): Promise<{ status: number; body: any }>;
}

export function client(url: string, cookie: string): Client {
	return {
		url,
		async call(method, path, body) {
			const response = await fetch(`${url}${path}`, {
				method,
				headers: { origin: url, cookie, ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
				body: body === undefined ? undefined : JSON.stringify(body)
			});
			const text = await response.text();
			let parsed: unknown = text;
			try {
				parsed = JSON.parse(text);
			} catch {
				// not JSON (an error page); keep the text
			}
			return { status: response.status, body: parsed };
		}
	};
}

export interface StreamEvent {
	event: string;
	data: any;
}

/** An open event stream: collects every event; `until` waits for a condition over what has arrived. */
export interface Stream {
	events: StreamEvent[];
	floor(): any[];
	until(predicate: (events: StreamEvent[]) => boolean, timeoutMs?: number): Promise<void>;
	close(): void;
	closed: Promise<void>;
}

export function openStream(url: string, cookie: string, cursor: number): Stream {
	const controller = new AbortController();
	const events: StreamEvent[] = [];
	const waiters = new Set<() => void>();
	const notify = () => waiters.forEach((w) => w());
	const closed = (async () => {
		try {
			const response = await fetch(`${url}/api/events`, {
				method: 'POST',
				headers: { origin: url, cookie, 'content-type': 'application/json' },
				body: JSON.stringify({ cursor }),
				signal: controller.signal
			});
			if (response.status !== 200 || !response.body) {
				events.push({ event: 'http_error', data: { status: response.status, body: await response.text() } });
				return;
			}
			const decoder = new TextDecoder();
			let buffer = '';
			for await (const chunk of response.body) {
				buffer += decoder.decode(chunk as Uint8Array, { stream: true });
				let cut: number;
				while ((cut = buffer.indexOf('\n\n')) >= 0) {
					const block = buffer.slice(0, cut);
					buffer = buffer.slice(cut + 2);
					let name = 'message';
					const data: string[] = [];
					for (const line of block.split('\n')) {
						if (line.startsWith('event: ')) name = line.slice(7);
						else if (line.startsWith('data: ')) data.push(line.slice(6));
					}
					const text = data.join('\n');
					let value: unknown = text;
					try {
						value = text ? JSON.parse(text) : text;
					} catch {
						// keep raw
					}
					events.push({ event: name, data: value });
					notify();
				}
			}
		} catch (error) {
			if (!controller.signal.aborted) events.push({ event: 'stream_error', data: String(error) });
		} finally {
			events.push({ event: 'closed', data: null });
			notify();
		}
	})();
	return {
		events,
		floor: () => events.filter((e) => e.event === 'floor').map((e) => e.data),
		until(predicate, timeoutMs = 10_000) {
			return new Promise((resolve, reject) => {
				const check = () => {
					if (predicate(events)) {
						waiters.delete(check);
						clearTimeout(timer);
						resolve();
					}
				};
				const timer = setTimeout(() => {
					waiters.delete(check);
					reject(new Error(`stream condition not met in ${timeoutMs} ms; got ${events.map((e) => e.event).join(',')}`));
				}, timeoutMs);
				waiters.add(check);
				check();
			});
		},
		close: () => controller.abort(),
		closed
	};
}

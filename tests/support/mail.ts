// What a local mail catcher (scripts/mail-catcher.mjs) received, read from its folder, and a catcher of a test's own
// that the test can stop and start again.
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';

/** The tests' catcher's folder (`npm test` starts it on LUGLINE_TEST_SMTP_PORT, default 54379). */
export const testMailDir = resolve(process.env.LUGLINE_DATA_DIR ?? '.data', 'mail-test');

/** One caught message as the catcher keeps it (`<id>.json`, beside the raw `<id>.eml`). */
export interface CaughtMail {
	id: string;
	receivedAt: string;
	envelope: { from: string; to: string[] };
	messageId: string | null;
	subject: string;
	from: { name: string; address: string }[];
	to: { name: string; address: string }[];
	replyTo: { name: string; address: string }[];
	headers: { key: string; line: string }[];
	text: string;
	html: string;
	eml: string;
	/** The message exactly as received. */
	raw: string;
}

/** Every message in `dir`, oldest first. */
export function readMail(dir = testMailDir): CaughtMail[] {
	if (!existsSync(dir)) return [];
	return readdirSync(dir)
		.filter((f) => f.endsWith('.json') && !f.startsWith('.'))
		.sort()
		.map((f) => {
			const mail = JSON.parse(readFileSync(join(dir, f), 'utf8')) as Omit<CaughtMail, 'raw'>;
			return { ...mail, raw: readFileSync(join(dir, mail.eml), 'utf8') };
		});
}

/** The messages sent to `address` (envelope recipients). */
export function mailTo(address: string, dir = testMailDir): CaughtMail[] {
	const wanted = address.toLowerCase();
	return readMail(dir).filter((m) => m.envelope.to.some((a) => a.toLowerCase() === wanted));
}

/** Waits until `check` returns a value other than undefined, null, false or '', or fails after `timeoutMs`. */
export async function eventually<T>(
	check: () => T | undefined | null | false | '' | Promise<T | undefined | null | false | ''>,
	what: string,
	timeoutMs = 10_000
): Promise<T> {
	const deadline = Date.now() + timeoutMs;
	for (;;) {
		const value = await check();
		if (value !== undefined && value !== null && value !== false && value !== '') return value as T;
		if (Date.now() > deadline) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
		await new Promise((r) => setTimeout(r, 100));
	}
}

export interface Catcher {
	port: number;
	dir: string;
	process: ChildProcess;
	stop(): Promise<void>;
}

/**
 * Starts scripts/mail-catcher.mjs as the tests' catcher on `port`, keeping messages in `dir` (wiped first unless
 * `keep`), and resolves once it is ready.
 */
export function startCatcher(port: number, dir: string, { keep = false } = {}): Promise<Catcher> {
	const args = [
		'scripts/mail-catcher.mjs',
		'--test',
		'--port',
		String(port),
		'--dir',
		dir,
		...(keep ? ['--keep'] : [])
	];
	const child = spawn(process.execPath, args, { stdio: ['ignore', 'pipe', 'pipe', 'ipc'] });
	const stop = () =>
		new Promise<void>((done) => {
			if (child.exitCode !== null || child.signalCode !== null) return done();
			child.once('exit', () => done());
			child.kill('SIGTERM');
			setTimeout(() => child.kill('SIGKILL'), 5000).unref();
		});
	return new Promise((resolveReady, reject) => {
		let errors = '';
		let out = '';
		child.stderr!.on('data', (d) => (errors += d));
		child.stdout!.on('data', (d) => {
			out += d;
			if (out.includes('mail catcher ready')) resolveReady({ port, dir, process: child, stop });
		});
		child.once('exit', (code) => reject(new Error(`the mail catcher exited (${code}): ${errors}`)));
	});
}

// The local SMTP catcher for customer notices (smtp-server + mailparser, dev dependencies), on loopback only:
//   node scripts/mail-catcher.mjs          the app's: port from SMTP_PORT (default 54369), messages in .data/mail
//   node scripts/mail-catcher.mjs --test   the tests': port LUGLINE_TEST_SMTP_PORT (default 54379), .data/mail-test,
//                                          wiped first
//   --port <n> --dir <folder>              another port or folder (a test that stops and restarts its own catcher)
//   --keep                                 do not wipe the folder (that restart)
// Each message is kept twice under the folder: `<name>.eml` (the raw message as received) and `<name>.json` (the
// envelope and what mailparser reads from it); the JSON is written last, by rename, so a reader that lists `*.json`
// never sees half a message. No authentication and no TLS: it listens on 127.0.0.1 only and delivers nothing.
// Recipients starting with "refuse" are refused with 550 (a mailbox that does not exist), for tests.
// `npm start` and `npm test` run it as a child process (scripts/setup.mjs, startMailCatcher) and wait for its one
// line "mail catcher ready on smtp://…"; it stops on SIGTERM/SIGINT and when its parent goes away. A real mail
// service needs none of this.
import { mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { join, resolve } from 'node:path';
import { localSmtpHost, mailCatchers, smtp } from './config.mjs';

const argv = process.argv.slice(2);
const option = (name) => {
	const at = argv.indexOf(name);
	return at >= 0 ? argv[at + 1] : undefined;
};
const base = argv.includes('--test') ? mailCatchers.test : mailCatchers.app;
const catcher = {
	...base,
	port: option('--port') ? Number(option('--port')) : base.port,
	dir: option('--dir') ? resolve(option('--dir')) : base.dir,
	fresh: base.fresh && !argv.includes('--keep')
};
/** The largest message accepted; a notice is a few kilobytes. */
const MAX_BYTES = 5 * 1024 * 1024;

function fail(message) {
	console.error(`[mail-catcher] ${message}`);
	process.exit(1);
}

if (catcher.name === 'app' && !option('--port') && smtp.host !== localSmtpHost) {
	fail(`SMTP_HOST is ${smtp.host}, not ${localSmtpHost}: that is a real mail service, not a place for the catcher.`);
}
if (!Number.isInteger(catcher.port) || catcher.port < 1 || catcher.port > 65535) fail(`Not a port: ${catcher.port}`);

function portFree(port) {
	return new Promise((done) => {
		const probe = createServer();
		probe.once('error', () => done(false));
		probe.listen(port, localSmtpHost, () => probe.close(() => done(true)));
	});
}
if (!(await portFree(catcher.port))) {
	fail(
		`Port ${catcher.port} is already taken by another program, so the local mail catcher cannot start. ` +
			(catcher.name === 'test'
				? 'Choose a free one with LUGLINE_TEST_SMTP_PORT=<port>.'
				: 'Choose a free one with SMTP_PORT=<port>, or stop what holds it.')
	);
}

if (catcher.fresh) rmSync(catcher.dir, { recursive: true, force: true });
mkdirSync(catcher.dir, { recursive: true });

const { SMTPServer } = await import('smtp-server');
const { simpleParser } = await import('mailparser');

let sequence = 0;

/** Keeps one received message: the raw bytes first, then the JSON that makes it visible to readers. */
async function keep(raw, session) {
	const receivedAt = new Date();
	const name = `${receivedAt.toISOString().replace(/[:.]/g, '-')}-${process.pid}-${String(++sequence).padStart(5, '0')}`;
	writeFileSync(join(catcher.dir, `${name}.eml`), raw);
	const parsed = await simpleParser(raw, { skipImageLinks: true });
	const addresses = (field) =>
		(Array.isArray(field) ? field : field ? [field] : []).flatMap((a) =>
			a.value.map((v) => ({ name: v.name, address: v.address }))
		);
	const record = {
		id: name,
		receivedAt: receivedAt.toISOString(),
		envelope: {
			from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
			to: session.envelope.rcptTo.map((r) => r.address)
		},
		messageId: parsed.messageId ?? null,
		subject: parsed.subject ?? '',
		from: addresses(parsed.from),
		to: addresses(parsed.to),
		replyTo: addresses(parsed.replyTo),
		headers: parsed.headerLines.map((h) => ({ key: h.key, line: h.line })),
		text: parsed.text ?? '',
		html: typeof parsed.html === 'string' ? parsed.html : '',
		eml: `${name}.eml`
	};
	const tmp = join(catcher.dir, `.${name}.json.tmp`);
	writeFileSync(tmp, JSON.stringify(record, null, '\t'));
	renameSync(tmp, join(catcher.dir, `${name}.json`));
	return record;
}

const server = new SMTPServer({
	name: 'mail-catcher.lugline.test',
	banner: 'Lugline local mail catcher: nothing is delivered',
	authOptional: true,
	disabledCommands: ['AUTH', 'STARTTLS'],
	size: MAX_BYTES,
	logger: false,
	// A mailbox that does not exist, for tests of a recipient the server refuses for good: any address that starts
	// with "refuse" gets 550, as a real server answers for an unknown user.
	onRcptTo(address, session, callback) {
		if (/^refuse/i.test(address.address)) {
			const error = new Error('No such mailbox (the catcher refuses addresses that start with "refuse")');
			error.responseCode = 550;
			return callback(error);
		}
		callback();
	},
	onData(stream, session, callback) {
		const chunks = [];
		stream.on('data', (chunk) => chunks.push(chunk));
		stream.on('end', () => {
			if (stream.sizeExceeded) {
				const error = new Error(`Message exceeds the catcher's limit of ${MAX_BYTES} bytes`);
				error.responseCode = 552;
				return callback(error);
			}
			keep(Buffer.concat(chunks), session).then(
				(record) => {
					console.log(`caught ${record.id}: "${record.subject}" → ${record.envelope.to.join(', ')}`);
					callback();
				},
				(error) => callback(error)
			);
		});
	}
});
server.on('error', (error) => console.error(`[mail-catcher] ${error instanceof Error ? error.message : error}`));
await new Promise((done, reject) => {
	server.server.once('error', reject);
	server.listen(catcher.port, localSmtpHost, done);
}).catch((error) => fail(`could not listen on ${localSmtpHost}:${catcher.port}: ${error.message}`));
console.log(`mail catcher ready on smtp://${localSmtpHost}:${catcher.port} (messages in ${catcher.dir})`);

let stopping = false;
const stop = () => {
	if (stopping) return;
	stopping = true;
	server.close(() => process.exit(0));
	setTimeout(() => process.exit(0), 2000).unref();
};
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
// The parent went away without a signal (killed): do not linger holding the port.
process.on('disconnect', stop);

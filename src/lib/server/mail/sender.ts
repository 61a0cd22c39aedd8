// The outbox sender: one loop per app instance, started by hooks.server.ts when the server starts and stopped on
// `sveltekit:shutdown`. Each pass sends the due notices one at a time, at most MAIL_BATCH, then waits MAIL_POLL_MS
// (no wait when the batch was full). A notice that fails waits longer after each attempt (MAIL_RETRY_BASE_MS ×
// 2^(attempt − 1), at most MAIL_RETRY_MAX_MS) and is given up after MAIL_MAX_ATTEMPTS, or at once when the mail
// server refuses the recipient for good (a 5xx to RCPT TO); a given-up notice keeps `sent_at` NULL, gets
// `send_after = 'infinity'` and says why in `last_error`.
//
// Sent once, with several instances: a notice is claimed with `SELECT … FOR UPDATE SKIP LOCKED` in its own
// transaction, which holds the row lock while the message goes out and commits `sent_at` right after the server
// accepted it. Another instance skips a locked row, and after the commit the row is no longer due, so two instances
// never send the same notice. The one way to send it twice is to lose the transaction between the server's "250
// accepted" and the commit (the process killed, the database gone at that moment): the row is unlocked unchanged and
// sent again later. That is the only possible duplicate, and it carries the same Message-ID
// (`<outbox-<id>.<store>@…>`), so mail programs can tell. Claiming with a committed lease instead would trade it for
// a lost notice when a lease expires mid-send; a customer told twice is the lesser harm.
import type { Knex } from 'knex';
import { config } from '../config';
import { db } from '../db';
import { render } from './notices';
import { deliver, isPermanentRecipientError, recipientSchema, senderDomain, reset } from './transport';
import { log } from '../log';

type Outcome = 'none' | 'sent' | 'failed' | 'refused' | 'gave_up';

let stopped = true;
let timer: ReturnType<typeof setTimeout> | null = null;
let running: Promise<void> | null = null;
/** Logged once when sending starts failing and once when it works again, not per notice. */
let failing = false;

function reason(error: unknown): string {
	const e = error as { code?: string; responseCode?: number; message?: string } | undefined;
	const text = [e?.code, e?.message ?? String(error)].filter(Boolean).join(': ');
	return text.replace(/\s+/g, ' ').trim().slice(0, 500);
}

export function backoffMs(attempt: number): number {
	const { MAIL_RETRY_BASE_MS, MAIL_RETRY_MAX_MS } = config();
	return Math.min(MAIL_RETRY_MAX_MS, MAIL_RETRY_BASE_MS * 2 ** Math.max(0, attempt - 1));
}

async function giveUp(trx: Knex.Transaction, id: number, attempts: number, why: string): Promise<void> {
	await trx('outbox')
		.where({ id })
		.update({ attempts, last_error: why.slice(0, 1000), send_after: trx.raw("'infinity'::timestamptz") });
}

/** Claims the next due notice, sends it and records the outcome, all in one transaction (see above). */
async function sendNext(): Promise<Outcome> {
	return db().transaction(async (trx) => {
		const row = await trx('outbox')
			.select('id', 'store_id', 'kind', 'to_name', 'to_address', 'payload', 'attempts')
			.whereNull('sent_at')
			.where('send_after', '<=', trx.fn.now())
			.orderBy([
				{ column: 'send_after', order: 'asc' },
				{ column: 'id', order: 'asc' }
			])
			.forUpdate()
			.skipLocked()
			.first();
		if (!row) return 'none';
		const id = Number(row.id);
		const attempt = row.attempts + 1;

		// A row that cannot become a message never will: give it up now rather than retry it for hours.
		const to = recipientSchema.safeParse({ name: row.to_name, address: row.to_address });
		if (!to.success) {
			await giveUp(trx, id, attempt, `Gave up: the address "${row.to_address}" is ${to.error.issues[0].message}.`);
			return 'gave_up';
		}
		let notice;
		try {
			notice = render(row.kind, row.payload);
		} catch (e) {
			await giveUp(trx, id, attempt, `Gave up: the notice cannot be written from what was stored (${reason(e)}).`);
			return 'gave_up';
		}
		const storeEmail = (row.payload as { store?: { email?: string; name?: string } }).store;
		const replyTo = recipientSchema.safeParse({ name: storeEmail?.name ?? '', address: storeEmail?.email ?? '' });

		try {
			await deliver({
				to: to.data,
				replyTo: replyTo.success ? replyTo.data : undefined,
				...notice,
				messageId: `<outbox-${id}.${row.store_id}@${senderDomain()}>`
			});
		} catch (e) {
			const { MAIL_MAX_ATTEMPTS } = config();
			const refused = isPermanentRecipientError(e);
			if (refused || attempt >= MAIL_MAX_ATTEMPTS) {
				const why = refused
					? `Gave up: the mail server refused the recipient (${reason(e)}).`
					: `Gave up after ${attempt} attempt${attempt === 1 ? '' : 's'}: ${reason(e)}`;
				await giveUp(trx, id, attempt, why);
				return refused ? 'refused' : 'gave_up';
			}
			await trx('outbox')
				.where({ id })
				.update({
					attempts: attempt,
					last_error: reason(e),
					send_after: trx.raw('now() + make_interval(secs => ?)', [backoffMs(attempt) / 1000])
				});
			if (!failing) log.warn({ reason: reason(e) }, 'mail: sending failed; notices wait in the outbox and are retried');
			failing = true;
			return 'failed';
		}
		// Sent: the server has the message. Commit at once (see the top of this file).
		await trx('outbox').where({ id }).update({ sent_at: trx.fn.now(), attempts: attempt });
		if (failing) log.info('mail: sending works again');
		failing = false;
		return 'sent';
	});
}

/** One pass: true when it stopped at the batch size, so more may be due at once. */
async function pass(): Promise<boolean> {
	const { MAIL_BATCH } = config();
	for (let i = 0; i < MAIL_BATCH; i++) {
		if (stopped) return false;
		const outcome = await sendNext();
		if (outcome === 'none') return false;
		// The server itself is not taking mail (down, refusing us): the next notices would fail the same way.
		if (outcome === 'failed') return false;
	}
	return true;
}

function schedule(ms: number) {
	if (stopped) return;
	timer = setTimeout(() => {
		timer = null;
		running = pass()
			.then(
				(more) => schedule(more ? 0 : config().MAIL_POLL_MS),
				(error) => {
					// The database is away (or a bug): log it, keep the loop alive, try again on the next poll.
					log.warn({ reason: reason(error) }, 'mail: outbox pass failed');
					schedule(config().MAIL_POLL_MS);
				}
			)
			.finally(() => {
				running = null;
			});
	}, ms);
	// The loop never keeps a stopping process alive.
	timer.unref();
}

/** Starts this instance's loop (once; later calls do nothing). */
export function start(): void {
	if (!stopped) return;
	stopped = false;
	let first = 1000;
	try {
		first = Math.min(config().MAIL_POLL_MS, 1000);
	} catch (error) {
		// Not configured: say so now, and let the first pass say it again (config() throws until it is fixed).
		log.warn({ reason: reason(error) }, 'mail: not configured');
	}
	schedule(first);
}

/** Stops the loop and waits for the notice being sent, if any, to be recorded. */
export async function stop(): Promise<void> {
	stopped = true;
	if (timer) clearTimeout(timer);
	timer = null;
	await running?.catch(() => {});
	reset();
}

// Sending one message over SMTP with nodemailer, from the server's configuration (SMTP_*, MAIL_FROM). Recipients go
// to nodemailer only as `{ name, address }` objects checked here: a raw address string with CR/LF or a comma in it
// would change who receives the mail. Display names and subjects are flattened to one line before nodemailer encodes
// them, so nothing in a customer's name can become a header.
import nodemailer, { type Transporter } from 'nodemailer';
import type SMTPTransport from 'nodemailer/lib/smtp-transport';
import { z } from 'zod';
import { config } from '../config';
import { oneLine } from './notices';

export const recipientSchema = z.object({
	name: z.string().transform((name) => oneLine(name, 120)),
	address: z
		.email({ error: 'not an e-mail address like name@example.com' })
		.max(254, 'an e-mail address has at most 254 characters')
});
export type Recipient = z.output<typeof recipientSchema>;

export interface Outgoing {
	to: Recipient;
	replyTo?: Recipient;
	subject: string;
	text: string;
	html: string;
	/** The same id on every attempt, so a copy sent twice (see sender.ts) is recognisably the same message. */
	messageId: string;
}

const isLoopback = (host: string) => host === 'localhost' || host === '::1' || /^127\./.test(host);

// Bounds on every step: the sender holds the notice's row lock while it sends (sender.ts), so a mail server that
// stops answering must not hold it for long.
const TIMEOUTS = { connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 30_000, dnsTimeout: 10_000 };

let transporter: Transporter<SMTPTransport.SentMessageInfo> | undefined;

function transport(): Transporter<SMTPTransport.SentMessageInfo> {
	if (transporter) return transporter;
	const c = config();
	const local = isLoopback(c.SMTP_HOST);
	transporter = nodemailer.createTransport({
		host: c.SMTP_HOST,
		port: c.SMTP_PORT,
		secure: c.SMTP_SECURE,
		auth: c.SMTP_USER ? { user: c.SMTP_USER, pass: c.SMTP_PASSWORD } : undefined,
		// The local catcher on loopback has no TLS. Anywhere else, STARTTLS when offered, and required before a
		// password goes over the wire.
		ignoreTLS: local && !c.SMTP_SECURE,
		requireTLS: !local && !c.SMTP_SECURE && Boolean(c.SMTP_USER),
		...TIMEOUTS
	});
	return transporter;
}

export function sender(): Recipient {
	return recipientSchema.parse(config().MAIL_FROM);
}

/** Sends one message; resolves with the server's answer, rejects with nodemailer's error. */
export async function deliver(message: Outgoing): Promise<SMTPTransport.SentMessageInfo> {
	return transport().sendMail({
		from: sender(),
		to: [message.to],
		replyTo: message.replyTo ? [message.replyTo] : undefined,
		subject: oneLine(message.subject, 250),
		text: message.text,
		html: message.html,
		messageId: message.messageId,
		headers: {
			// RFC 3834: an automatic message; out-of-office replies should not answer it.
			'Auto-Submitted': 'auto-generated'
		}
	});
}

/** The domain of MAIL_FROM, for message ids. */
export function senderDomain(): string {
	return sender().address.split('@')[1];
}

/** Whether an SMTP error is about this recipient and will not change on retry (a 5xx answer to RCPT TO). */
export function isPermanentRecipientError(error: unknown): boolean {
	const e = error as { responseCode?: number; command?: string } | undefined;
	return (
		typeof e?.responseCode === 'number' && e.responseCode >= 500 && e.responseCode < 600 && e.command === 'RCPT TO'
	);
}

/** Drops the cached transport (the settings are read again on the next send). */
export function reset(): void {
	transporter?.close();
	transporter = undefined;
}

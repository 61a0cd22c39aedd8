import { error } from '@sveltejs/kit';
import { z } from 'zod';
import type { PageServerLoad } from './$types';
import { config } from '$lib/server/config';
import { orUnavailable, staffOf } from '$lib/server/guard';
import * as outbox from '$lib/server/mail/outbox';
import { noticeLabels } from '$lib/server/mail/notices';

const beforeSchema = z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER).optional();

/** "2026-12-02 15:30" in the store's time zone: the floor reads times as the store's clock shows them. */
function clock(timezone: string) {
	let format: Intl.DateTimeFormat;
	try {
		format = new Intl.DateTimeFormat('en-CA', {
			timeZone: timezone,
			year: 'numeric',
			month: '2-digit',
			day: '2-digit',
			hour: '2-digit',
			minute: '2-digit',
			hourCycle: 'h23'
		});
	} catch {
		format = new Intl.DateTimeFormat('en-CA', { timeZone: 'UTC', dateStyle: 'short', timeStyle: 'short' });
	}
	return (iso: string | null) => (iso ? format.format(new Date(iso)).replace(',', '') : null);
}

export const load: PageServerLoad = async ({ locals, url, parent }) => {
	const staff = staffOf(locals);
	const before = beforeSchema.safeParse(url.searchParams.get('before') ?? undefined);
	if (!before.success) error(400, 'The `before` parameter must be an outbox id (a whole number).');
	const [{ store }, page, settings] = await Promise.all([
		parent(),
		orUnavailable(() => outbox.list(staff.storeId, before.data)),
		orUnavailable(() => outbox.settings(staff.storeId))
	]);
	const at = clock(store.timezone);
	const now = Date.now();
	const { SMTP_HOST, SMTP_PORT, MAIL_CAPTURE_DIR } = config();
	return {
		timezone: store.timezone,
		settings,
		mail: { server: `${SMTP_HOST}:${SMTP_PORT}`, captureDir: MAIL_CAPTURE_DIR ?? null },
		entries: page.entries.map((e) => ({
			id: e.id,
			kind: noticeLabels[e.kind],
			jobNumber: e.jobNumber,
			to: e.to,
			created: at(e.createdAt),
			sendAfter: at(e.sendAfter),
			attempts: e.attempts,
			lastError: e.lastError,
			sent: at(e.sentAt),
			status: e.sentAt
				? 'sent'
				: e.sendAfter === null
					? 'given up'
					: new Date(e.sendAfter).getTime() > now
						? e.attempts > 0
							? 'retrying'
							: 'scheduled'
						: 'due',
			subject: e.notice?.subject ?? null,
			text: e.notice?.text ?? null,
			renderError: e.renderError
		})),
		older: page.more ? page.entries[page.entries.length - 1].id : null,
		newest: before.data === undefined
	};
};

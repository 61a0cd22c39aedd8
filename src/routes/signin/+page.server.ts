import { fail, redirect } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { clientAddress, signInWithPassword } from '$lib/server/auth';
import { log } from '$lib/server/log';
import { signInSchema } from '$lib/schemas/signin';

/** Only same-site paths: an open redirect after sign-in would hand a phishing page a trusted link. */
function safeTarget(target: string | null | undefined): string {
	return target && target.startsWith('/') && !target.startsWith('//') && !target.startsWith('/\\') ? target : '/';
}

export const load: PageServerLoad = async ({ locals, url }) => {
	const session = await locals.auth().catch(() => null);
	if ((session as { staff?: unknown } | null)?.staff) redirect(303, safeTarget(url.searchParams.get('redirectTo')));
	return { redirectTo: safeTarget(url.searchParams.get('redirectTo')) };
};

const messages = {
	credentials: 'That e-mail and password do not match an active account.',
	unavailable: 'The database is not answering. Try again in a few seconds.'
} as const;

/** How long to wait, in words a person at the counter can act on (the lock is 1 s to 15 min). */
function slowedMessage(seconds: number): string {
	const wait = seconds < 90 ? `${seconds} s` : `${Math.ceil(seconds / 60)} min`;
	return `Too many failed sign-ins, for this account or from this place. Try again in ${wait}.`;
}

export const actions: Actions = {
	default: async (event) => {
		const form = Object.fromEntries(await event.request.formData());
		const parsed = signInSchema.safeParse(form);
		const email = typeof form.email === 'string' ? form.email.slice(0, 254) : '';
		if (!parsed.success) {
			const issues = parsed.error.issues.map((i) => ({ path: i.path.join('.') || '(form)', message: i.message }));
			const errors: Record<string, string> = Object.fromEntries(issues.map((i) => [i.path, i.message]));
			log.info(
				{ requestId: event.locals.requestId, email, address: clientAddress(event), outcome: 'invalid' },
				'sign-in attempt'
			);
			return fail(400, { code: 'invalid_input', email, errors, issues, message: 'Check the highlighted fields.' });
		}
		const result = await signInWithPassword(event, parsed.data.email, parsed.data.password);
		if (!result.ok) {
			if (result.code === 'slowed') event.setHeaders({ 'retry-after': String(result.retryAfter) });
			const status = result.code === 'slowed' ? 429 : result.code === 'unavailable' ? 503 : 400;
			return fail(status, {
				code: result.code === 'credentials' ? 'wrong_credentials' : result.code,
				email,
				errors: {} as Record<string, string>,
				issues: [],
				message: result.code === 'slowed' ? slowedMessage(result.retryAfter) : messages[result.code]
			});
		}
		redirect(303, safeTarget(parsed.data.redirectTo));
	}
};

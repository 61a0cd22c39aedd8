// Who is standing at a shared bay screen. The claim's token lives in this tab's sessionStorage (a reload keeps it,
// another tab or device does not) and goes with every API request this screen makes, so the server acts as the
// person who claimed it. The claim ends on release, when the server says it has ended, or when the screen has been
// left alone for IDLE_MS (the screen goes back to its neutral view).
import { z } from 'zod';
import { CLAIM_HEADER, type ClaimView } from '$lib/schemas/bay';

export const IDLE_MS = 5 * 60_000;

const stored = z.object({
	token: z.string().min(1),
	bayCode: z.string(),
	userId: z.number(),
	name: z.string(),
	role: z.string()
});

function storage(): Storage | null {
	try {
		return typeof sessionStorage === 'undefined' ? null : sessionStorage;
	} catch {
		return null;
	}
}

export class BayClaim {
	current = $state<ClaimView | null>(null);
	/** What went wrong with the last claim attempt, in words. */
	error = $state<string | null>(null);
	busy = $state(false);

	readonly code: string;
	#key: string;
	#idle: ReturnType<typeof setTimeout> | undefined;

	constructor(code: string) {
		this.code = code;
		this.#key = `lugline:bay-claim:${code}`;
		const raw = storage()?.getItem(this.#key);
		if (raw) {
			try {
				const parsed = stored.safeParse(JSON.parse(raw));
				if (parsed.success && parsed.data.bayCode === code) this.current = parsed.data;
			} catch {
				// unreadable: no claim
			}
		}
	}

	/** A fetch that carries the claim; a 401 `claim_ended` ends it here too. */
	fetch: typeof fetch = async (input, init = {}) => {
		const headers = new Headers(init.headers);
		if (this.current) headers.set(CLAIM_HEADER, this.current.token);
		const response = await fetch(input, { ...init, headers });
		if (response.status === 401 && this.current) {
			const body = await response
				.clone()
				.json()
				.catch(() => null);
			if (body?.code === 'claim_ended') this.#end('Your claim on this screen has ended. Claim it again with your PIN.');
		}
		this.touch();
		return response;
	};

	async claim(userId: number, pin: string): Promise<boolean> {
		this.busy = true;
		this.error = null;
		try {
			const r = await fetch(`/api/bays/${encodeURIComponent(this.code)}/claim`, {
				method: 'POST',
				headers: { 'content-type': 'application/json', accept: 'application/json' },
				body: JSON.stringify({ userId, pin })
			});
			const body = await r.json().catch(() => null);
			if (!r.ok) {
				this.error = body?.message ?? `The claim was refused (HTTP ${r.status}).`;
				return false;
			}
			this.current = body as ClaimView;
			storage()?.setItem(this.#key, JSON.stringify(this.current));
			this.touch();
			return true;
		} catch {
			this.error = 'The server could not be reached. Try again.';
			return false;
		} finally {
			this.busy = false;
		}
	}

	async release(reason: string | null = null): Promise<void> {
		const token = this.current?.token;
		this.#end(reason);
		if (token) {
			await fetch(`/api/bays/${encodeURIComponent(this.code)}/claim`, {
				method: 'DELETE',
				headers: { [CLAIM_HEADER]: token }
			}).catch(() => {});
		}
	}

	/** Something happened on the screen: the idle clock starts again. */
	touch(): void {
		clearTimeout(this.#idle);
		if (this.current) {
			this.#idle = setTimeout(() => void this.release('The screen was left alone, so the claim ended.'), IDLE_MS);
		}
	}

	#end(reason: string | null) {
		clearTimeout(this.#idle);
		this.current = null;
		this.error = reason;
		storage()?.removeItem(this.#key);
	}
}

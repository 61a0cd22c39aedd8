// Password and PIN hashing with Argon2id (@node-rs/argon2, default parameters: 19 MiB, 2 passes).
import { hash, verify } from '@node-rs/argon2';

export function hashSecret(secret: string): Promise<string> {
	return hash(secret);
}

export async function verifySecret(stored: string, attempt: string): Promise<boolean> {
	try {
		return await verify(stored, attempt);
	} catch {
		// A malformed stored hash is a failed check, not a crash of the sign-in page.
		return false;
	}
}

let decoy: Promise<string> | undefined;

/**
 * Spends the same time as a real check when no account has the e-mail, so timing does not tell
 * an attacker which accounts exist.
 */
export async function verifyDecoy(attempt: string): Promise<false> {
	decoy ??= hash('lugline-decoy-password-for-timing');
	await verifySecret(await decoy, attempt);
	return false;
}

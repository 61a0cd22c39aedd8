// The bay screen's claim: who stands at a shared bay screen, proven with a PIN.
import { z } from 'zod';

/** The header a claimed bay screen sends with its API requests (see src/lib/server/db/claims.ts). */
export const CLAIM_HEADER = 'x-lugline-claim';

export const claimSchema = z.strictObject({
	// At most PostgreSQL's `integer`: a larger id reached the users query and failed there (500).
	userId: z.number({ error: 'Pick who you are' }).int().positive().max(2_147_483_647, 'Pick who you are'),
	pin: z.string({ error: 'Enter your PIN' }).regex(/^\d{4,8}$/, 'A PIN is 4 to 8 digits')
});
export type ClaimInput = z.infer<typeof claimSchema>;

export interface ClaimView {
	token: string;
	bayCode: string;
	userId: number;
	name: string;
	role: string;
}

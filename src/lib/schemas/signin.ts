import { z } from 'zod';

export const signInSchema = z.object({
	email: z
		.string()
		.trim()
		.min(1, 'Enter your e-mail address')
		.max(254, 'That e-mail address is too long')
		.email('Enter an e-mail address like name@store.example'),
	password: z.string().min(1, 'Enter your password').max(200, 'That password is too long'),
	redirectTo: z.string().max(500).optional()
});

export type SignInInput = z.infer<typeof signInSchema>;

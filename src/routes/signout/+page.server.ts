import type { Actions } from './$types';
import { signOut } from '$lib/server/auth';

export const actions: Actions = { default: signOut };

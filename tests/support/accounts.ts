// The demo sign-ins the seed creates (invented demo staff), read from the same file as the seed.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Role } from '../../src/lib/roles';

export interface DemoAccount {
	role: Role;
	name: string;
	email: string;
	password: string;
}

export const demoAccounts: DemoAccount[] = JSON.parse(
	readFileSync(join(process.cwd(), 'seeds', 'demo-accounts.json'), 'utf8')
);

export function account(role: Role): DemoAccount {
	const found = demoAccounts.find((a) => a.role === role);
	if (!found) throw new Error(`seeds/demo-accounts.json has no ${role}`);
	return found;
}

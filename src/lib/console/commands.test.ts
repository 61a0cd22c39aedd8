import { describe, expect, it, vi } from 'vitest';
import { commandsFor, type ConsoleContext } from './commands';

describe('manage commands', () => {
	const manageIds = ['manage-staff', 'manage-bays', 'manage-services', 'manage-settings'];

	it('are offered to managers only', () => {
		expect(commandsFor('manager').map((c) => c.id)).toEqual(expect.arrayContaining(manageIds));
		for (const role of ['writer', 'lead', 'tech'] as const)
			expect(commandsFor(role).map((c) => c.id)).not.toEqual(expect.arrayContaining([manageIds[0]]));
	});

	it('each navigates to its page', () => {
		const navigate = vi.fn();
		const ctx = { navigate } as unknown as ConsoleContext;
		for (const c of commandsFor('manager').filter((c) => manageIds.includes(c.id))) void c.run(ctx);
		expect(navigate.mock.calls.map(([path]) => path)).toEqual([
			'/manage',
			'/manage/bays',
			'/manage/services',
			'/manage/settings'
		]);
	});

	it('keep keys no other command of the role uses', () => {
		const keys = commandsFor('manager').flatMap((c) => c.keys);
		expect(new Set(keys).size).toBe(keys.length);
	});
});

import type { Actions, PageServerLoad } from './$types';
import * as bays from '$lib/server/db/bays';
import { actorOf, orUnavailable, staffOf } from '$lib/server/guard';
import { bayRefSchema, newBaySchema, renameBaySchema } from '$lib/schemas/manage';
import { act } from '../form-outcome';

export const load: PageServerLoad = async ({ locals }) => ({
	bays: await orUnavailable(() => bays.list(staffOf(locals).storeId))
});

const ref = ['id', 'version'] as const;

export const actions: Actions = {
	add: ({ request, locals }) =>
		act(
			request,
			'add',
			['code', 'name'],
			newBaySchema,
			async (input) => {
				await bays.create(actorOf(locals), input);
				return `Bay ${input.code} added at the end.`;
			},
			'code'
		),
	rename: ({ request, locals }) =>
		act(request, 'rename', [...ref, 'name'], renameBaySchema, async ({ id, version, name }) => {
			await bays.rename(actorOf(locals), id, version, name);
			return `Renamed to ${name}.`;
		}),
	up: ({ request, locals }) =>
		act(request, 'up', ref, bayRefSchema, async ({ id, version }) => {
			await bays.reorder(actorOf(locals), id, version, -1);
			return 'Moved up.';
		}),
	down: ({ request, locals }) =>
		act(request, 'down', ref, bayRefSchema, async ({ id, version }) => {
			await bays.reorder(actorOf(locals), id, version, 1);
			return 'Moved down.';
		}),
	out: ({ request, locals }) =>
		act(request, 'out', ref, bayRefSchema, async ({ id, version }) => {
			const moved = await bays.setActive(actorOf(locals), id, version, false);
			return `Out of service; ${moved} queued wheel${moved === 1 ? '' : 's'} went back to waiting.`;
		}),
	in: ({ request, locals }) =>
		act(request, 'in', ref, bayRefSchema, async ({ id, version }) => {
			await bays.setActive(actorOf(locals), id, version, true);
			return 'Back in service.';
		})
};

import type { Actions, PageServerLoad } from './$types';
import * as services from '$lib/server/db/services';
import { actorOf, orUnavailable, staffOf } from '$lib/server/guard';
import { serviceEditSchema, serviceFields, serviceSchema } from '$lib/schemas/manage';
import { act } from '../form-outcome';

export const load: PageServerLoad = async ({ locals }) => ({
	services: await orUnavailable(() => services.list(staffOf(locals).storeId))
});

export const actions: Actions = {
	add: ({ request, locals }) =>
		act(
			request,
			'add',
			serviceFields,
			serviceSchema,
			async (input) => {
				await services.create(actorOf(locals), input);
				return `Service ${input.name} added.`;
			},
			'code'
		),
	save: ({ request, locals }) =>
		act(
			request,
			'save',
			['id', 'version', ...serviceFields],
			serviceEditSchema,
			async ({ id, version, ...input }) => {
				await services.update(actorOf(locals), id, version, input);
				return `Saved ${input.name}.`;
			},
			'code'
		)
};

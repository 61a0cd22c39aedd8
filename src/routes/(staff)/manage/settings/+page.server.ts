import { error } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import * as settings from '$lib/server/db/settings';
import { actorOf, orUnavailable, staffOf } from '$lib/server/guard';
import { settingsFields, settingsSchema } from '$lib/schemas/manage';
import { LBF_N, OZ_G } from '$lib/calc/units';
import { act } from '../form-outcome';

/** Limits are kept in SI; the form shows and takes them in the store's force and mass units. */
const round = (n: number, places = 2) => Math.round(n * 10 ** places) / 10 ** places;

export const load: PageServerLoad = async ({ locals }) => {
	const current = await orUnavailable(() => settings.read(staffOf(locals).storeId));
	if (!current) error(404, 'No such store.');
	return {
		settings: current,
		forceLimit: round(current.units.force === 'lbf' ? current.forceLimitN / LBF_N : current.forceLimitN),
		weightIncrement: round(current.units.mass === 'oz' ? current.weightIncrementG / OZ_G : current.weightIncrementG, 3),
		timeZones: Intl.supportedValuesOf('timeZone')
	};
};

export const actions: Actions = {
	save: ({ request, locals }) =>
		act(request, 'save', settingsFields, settingsSchema, async (input) => {
			const { version, pressure, mass, torque, length, tread, force, forceLimit, weightIncrement, ...rest } = input;
			await settings.save(actorOf(locals), version, {
				...rest,
				units: { pressure, mass, torque, length, tread, force },
				forceLimitN: round(force === 'lbf' ? forceLimit * LBF_N : forceLimit),
				weightIncrementG: round(mass === 'oz' ? weightIncrement * OZ_G : weightIncrement)
			});
			return 'Settings saved. Screens pick up new units and targets when they next load.';
		})
};

import type { Actions, PageServerLoad } from './$types';
import * as staff from '$lib/server/db/staff';
import { actorOf, orUnavailable, staffOf } from '$lib/server/guard';
import {
	newPersonSchema,
	passwordResetSchema,
	personRefSchema,
	pinSchema,
	roleChangeSchema
} from '$lib/schemas/manage';
import { roleLabels } from '$lib/roles';
import { act } from './form-outcome';

export const load: PageServerLoad = async ({ locals }) => {
	const me = staffOf(locals);
	return { people: await orUnavailable(() => staff.list(me.storeId)), me: me.userId };
};

export const actions: Actions = {
	add: ({ request, locals }) =>
		act(
			request,
			'add',
			['name', 'email', 'role', 'password'],
			newPersonSchema,
			async (input) => {
				const person = await staff.create(actorOf(locals), input);
				return `Added ${person.name} as ${roleLabels[person.role].toLowerCase()}.`;
			},
			'email'
		),
	role: ({ request, locals }) =>
		act(request, 'role', ['id', 'version', 'role'], roleChangeSchema, async ({ id, version, role }) => {
			const person = await staff.setRole(actorOf(locals), id, version, role);
			return `${person.name} is now ${roleLabels[person.role].toLowerCase()}.`;
		}),
	disable: ({ request, locals }) =>
		act(request, 'disable', ['id', 'version'], personRefSchema, async ({ id, version }) => {
			const person = await staff.setActive(actorOf(locals), id, version, false);
			return `${person.name} is disabled and signed out everywhere.`;
		}),
	enable: ({ request, locals }) =>
		act(request, 'enable', ['id', 'version'], personRefSchema, async ({ id, version }) => {
			const person = await staff.setActive(actorOf(locals), id, version, true);
			return `${person.name} can sign in again.`;
		}),
	password: ({ request, locals }) =>
		act(request, 'password', ['id', 'version', 'password'], passwordResetSchema, async ({ id, version, password }) => {
			const person = await staff.resetPassword(actorOf(locals), id, version, password);
			return `New password set for ${person.name}; their sessions have ended.`;
		}),
	pin: ({ request, locals }) =>
		act(request, 'pin', ['id', 'version', 'pin'], pinSchema, async ({ id, version, pin }) => {
			const person = await staff.setPin(actorOf(locals), id, version, pin === '' ? null : pin);
			return pin === '' ? `${person.name}'s PIN is cleared.` : `${person.name}'s PIN is set.`;
		})
};

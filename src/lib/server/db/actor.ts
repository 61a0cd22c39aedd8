import type { Role } from '$lib/roles';

/** Who is acting, passed explicitly to every write: the store it may touch and the role that decides what it may do. */
export interface Actor {
	userId: number;
	storeId: number;
	role: Role;
}

export const leads = (actor: Actor) => actor.role === 'lead' || actor.role === 'manager';

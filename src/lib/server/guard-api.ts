// The acting user of an API request, as the domain modules take it.
import type { Actor } from './db/actor';
import { staffOf } from './guard';

export function actorOf(locals: App.Locals): Actor {
	const { userId, storeId, role } = staffOf(locals);
	return { userId, storeId, role };
}

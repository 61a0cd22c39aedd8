// The fan-out inside one app instance: the listener hands each committed event to the open streams of its store.
// An event is serialised once here, not once per screen.
import { errorDetails, log } from '../log';

export interface Delivered {
	id: number;
	storeId: number;
	/** The event as the stream sends it: `{ id, type, at, jobs, wheels, bays }`. */
	json: string;
	/** The same, as one encoded server-sent event frame, shared by every screen. */
	frame: Uint8Array;
}

type Subscriber = (event: Delivered) => void;

const byStore = new Map<number, Set<Subscriber>>();

export function subscribe(storeId: number, subscriber: Subscriber): () => void {
	let set = byStore.get(storeId);
	if (!set) byStore.set(storeId, (set = new Set()));
	set.add(subscriber);
	return () => {
		set.delete(subscriber);
		if (set.size === 0 && byStore.get(storeId) === set) byStore.delete(storeId);
	};
}

/** Open streams on this instance (the health check reports it; the stream tests watch it return to its baseline). */
export function subscriberCount(): number {
	let n = 0;
	for (const set of byStore.values()) n += set.size;
	return n;
}

const anyListeners = new Set<(storeId: number) => void>();

/** Told of every event of every store (the board cache drops its copy). */
export function onAnyEvent(listener: (storeId: number) => void): () => void {
	anyListeners.add(listener);
	return () => anyListeners.delete(listener);
}

export function publish(event: Delivered): void {
	for (const listener of anyListeners) listener(event.storeId);
	for (const subscriber of byStore.get(event.storeId) ?? []) {
		try {
			subscriber(event);
		} catch (error) {
			// One broken stream must not stop the others.
			log.error({ err: errorDetails(error) }, 'live: a subscriber failed');
		}
	}
}

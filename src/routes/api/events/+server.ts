// The live stream of the user's store: server-sent events, read on the screens with sveltekit-sse's client (which
// connects with POST and a JSON body). The client sends the last events.id it applied; we replay everything after
// it from the table, send `ready`, then stream new events as this instance's listener publishes them. A cursor
// older than the kept window, or newer than anything here, gets one `resync` event.
import type { RequestHandler } from './$types';
import { ApiError, readJson, respond } from '$lib/server/api';
import * as board from '$lib/server/db/board';
import { staffOf } from '$lib/server/guard';
import * as hub from '$lib/server/live/hub';
import { ensureStarted, toDelivered } from '$lib/server/live/listener';
import * as sessions from '$lib/server/live/sessions';
import { eventStream } from '$lib/server/live/stream';
import { streamRequestSchema } from '$lib/schemas/floor';

export const POST: RequestHandler = ({ locals, request }) =>
	respond(async () => {
		const staff = staffOf(locals);
		const { cursor } = await readJson(request, streamRequestSchema);
		try {
			await ensureStarted();
		} catch {
			throw new ApiError(503, 'database_unavailable', 'The live feed cannot reach the database. Retrying shortly.');
		}
		const state = await board.cursorState(staff.storeId, cursor);

		return eventStream(async (out) => {
			if (state !== 'ok') {
				out.send('resync', JSON.stringify({ reason: state }));
				out.close();
				return;
			}
			let last = cursor;
			let replaying = true;
			const buffered: hub.Delivered[] = [];
			const send = (e: hub.Delivered) => {
				if (e.id <= last) return; // already sent (replay and live overlap)
				last = e.id;
				if (!out.write(e.frame)) out.close();
			};
			const unsubscribe = hub.subscribe(staff.storeId, (e) => (replaying ? buffered.push(e) : send(e)));
			const unwatch = sessions.watch({
				userId: staff.userId,
				sessionVersion: staff.sessionVersion,
				end: () => {
					out.send('signed_out', '{}');
					out.close();
				}
			});
			try {
				for (;;) {
					const rows = await board.eventsAfter(staff.storeId, last);
					for (const row of rows) send(toDelivered(row));
					if (rows.length < 1000) break;
				}
				replaying = false;
				for (const e of buffered.splice(0)) send(e);
				out.send('ready', JSON.stringify({ cursor: last }));
			} catch {
				replaying = false;
				out.close();
			}
			return () => {
				unsubscribe();
				unwatch();
			};
		});
	});

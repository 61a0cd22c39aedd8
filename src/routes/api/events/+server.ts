// The live stream of the user's store (server-sent events through sveltekit-sse, which connects with POST).
// The client sends the last events.id it applied; we replay everything after it from the table, then stream new
// events as the listener publishes them. A cursor older than the kept window gets one `resync` event.
import { produce } from 'sveltekit-sse';
import type { RequestHandler } from './$types';
import { readJson, respond, ApiError } from '$lib/server/api';
import * as board from '$lib/server/db/board';
import { staffOf } from '$lib/server/guard';
import * as hub from '$lib/server/live/hub';
import { ensureStarted, toDelivered } from '$lib/server/live/listener';
import * as sessions from '$lib/server/live/sessions';
import { streamRequestSchema } from '$lib/schemas/floor';

export const POST: RequestHandler = ({ locals, request }) =>
	respond(async () => {
		const staff = staffOf(locals);
		const { cursor } = await readJson(request, streamRequestSchema);
		try {
			await ensureStarted();
		} catch (e) {
			throw new ApiError(503, 'database_unavailable', 'The live feed cannot reach the database. Retrying shortly.');
		}
		const state = await board.cursorState(staff.storeId, cursor);

		return produce(
			async ({ emit, lock }) => {
				const end = () => lock.set(false);
				if (state !== 'ok') {
					emit('resync', JSON.stringify({ reason: state }));
					end();
					return () => {};
				}
				let last = cursor;
				let replaying = true;
				const buffered: hub.Delivered[] = [];
				const send = (e: hub.Delivered) => {
					if (e.id <= last) return; // already sent (replay and live overlap)
					last = e.id;
					if (emit('floor', e.json).error) end();
				};
				const unsubscribe = hub.subscribe(staff.storeId, (e) => (replaying ? buffered.push(e) : send(e)));
				const unwatch = sessions.watch({
					userId: staff.userId,
					sessionVersion: staff.sessionVersion,
					end: () => {
						emit('signed_out', '{}');
						end();
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
					emit('ready', JSON.stringify({ cursor: last }));
				} catch {
					replaying = false;
					end();
				}
				return () => {
					unsubscribe();
					unwatch();
				};
			},
			{ ping: 15_000, headers: { 'X-Accel-Buffering': 'no', 'Cache-Control': 'no-store' } }
		);
	});

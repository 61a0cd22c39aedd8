// The server side of the event stream, in the wire format sveltekit-sse's client reads (`event:` and `data:` lines).
// We write the frames ourselves rather than through sveltekit-sse's `produce`, whose `emit` re-encodes every event
// for every screen and writes it in at least three pieces: with a thousand screens that was three thousand writes
// per change. Here a floor event is encoded once (hub.ts) and each screen gets it as one chunk.

const encoder = new TextEncoder();

export function frame(event: string, data: string): Uint8Array {
	return encoder.encode(`event: ${event}\ndata: ${data}\n\n`);
}

export interface StreamWriter {
	/** Queues one pre-encoded frame; false once the stream is closed or the screen has fallen too far behind. */
	write(bytes: Uint8Array): boolean;
	send(event: string, data: string): boolean;
	close(): void;
}

/** A screen this many frames behind is cut off; it reconnects with its cursor and catches up from the table. */
const MAX_BEHIND = 1000;

export function eventStream(
	start: (writer: StreamWriter) => Promise<(() => void) | void> | (() => void) | void,
	{ pingMs = 15_000, headers = {} as Record<string, string> } = {}
): Response {
	let open = true;
	let cleanup: (() => void) | void;
	let ping: ReturnType<typeof setInterval> | undefined;
	const finish = () => {
		if (!open) return;
		open = false;
		clearInterval(ping);
		cleanup?.();
	};
	const stream = new ReadableStream<Uint8Array>({
		async start(controller) {
			const writer: StreamWriter = {
				write(bytes) {
					if (!open) return false;
					if ((controller.desiredSize ?? 0) < -MAX_BEHIND) {
						writer.close();
						return false;
					}
					try {
						controller.enqueue(bytes);
						return true;
					} catch {
						finish();
						return false;
					}
				},
				send: (event, data) => writer.write(frame(event, data)),
				close() {
					if (!open) return;
					try {
						controller.close();
					} catch {
						// already closed by the client
					}
					finish();
				}
			};
			ping = setInterval(() => writer.send('ping', ''), pingMs);
			const stop = await start(writer);
			if (open) cleanup = stop;
			else stop?.();
		},
		cancel() {
			finish();
		}
	});
	return new Response(stream, {
		headers: {
			'content-type': 'text/event-stream',
			'cache-control': 'no-store',
			connection: 'keep-alive',
			// Proxies such as nginx must pass each event on at once, not buffer the stream.
			'x-accel-buffering': 'no',
			...headers
		}
	});
}

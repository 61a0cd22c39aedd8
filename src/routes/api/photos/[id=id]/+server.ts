import type { RequestHandler } from './$types';
import { idParam, respond } from '$lib/server/api';
import { actorOf } from '$lib/server/guard';
import * as photos from '$lib/server/photos';

// A photo's bytes, through the app so only the store's signed-in staff see them. The bytes are our own re-encoding
// (src/lib/server/photos.ts); the headers keep a browser from treating them as anything but that image.
export const GET: RequestHandler = (event) =>
	respond(async () => {
		const { photo, bytes, filename } = await photos.open(actorOf(event.locals), idParam(event));
		return new Response(bytes, {
			headers: {
				'content-type': photo.contentType,
				'content-length': String(bytes.byteLength),
				'content-disposition': `inline; filename="${filename}"`,
				'x-content-type-options': 'nosniff',
				'content-security-policy': "default-src 'none'; sandbox",
				// A photo never changes under its id; private: shared caches must not keep it.
				'cache-control': 'private, max-age=3600'
			}
		});
	});

// A wheel's photos as the API gives them (src/lib/server/db/photos.ts) and the screens show them.
export const photoKinds = ['damage', 'finished', 'work'] as const;
export type PhotoKind = (typeof photoKinds)[number];

export interface PhotoView {
	id: number;
	kind: PhotoKind;
	contentType: string;
	sizeBytes: number;
	createdAt: string;
	/** Where a screen reads the bytes (through the app, never from storage directly). */
	url: string;
}

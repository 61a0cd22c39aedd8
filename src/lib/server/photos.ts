// Photos of damage and of finished work, from a phone or tablet camera or a file. An upload is refused unless it is
// a real JPEG, PNG or WebP by its content (never its name or declared type), within the size limit, and decodable;
// what is stored is always our own re-encoding (orientation applied, camera metadata such as GPS position and
// serial numbers dropped), so nothing a client sent reaches storage or another screen byte for byte.
// Order: multipart and its declared length (415/413) → who may (404/403) → size (413, empty 400) → type by content
// (415) → re-encode (422) → store the object → the row, in a transaction with its audit row and event. A refused upload leaves nothing behind; if the row cannot be written, the object is
// deleted again.
import { randomUUID } from 'node:crypto';
import { fileTypeFromBuffer } from 'file-type';
import sharp from 'sharp';
import { z } from 'zod';
import { ApiError, parse } from './api';
import type { Actor } from './db/actor';
import * as photos from './db/photos';
import { NotFound } from './errors';
import * as storage from './storage';
import { errorDetails, log } from './log';

/** The largest photo accepted. BODY_SIZE_LIMIT (scripts/config.mjs) must stay a little above it. */
export const MAX_PHOTO_BYTES = 10 * 1024 * 1024;
/** Room for the multipart framing and the `kind` field around the photo. */
const FORM_OVERHEAD_BYTES = 64 * 1024;
/**
 * Decoding is refused above this many pixels before any memory is spent on it: a small file can claim a huge
 * image. 50 MP is above what phone and tablet cameras save by default, and an RGBA decode of it is about 200 MB.
 */
export const MAX_PHOTO_PIXELS = 50_000_000;

const formats = {
	'image/jpeg': { ext: 'jpg', sharp: 'jpeg' },
	'image/png': { ext: 'png', sharp: 'png' },
	'image/webp': { ext: 'webp', sharp: 'webp' }
} as const;
type PhotoType = keyof typeof formats;
const isPhotoType = (mime: string | undefined): mime is PhotoType => mime !== undefined && mime in formats;

export const extensionOf = (contentType: string) => (isPhotoType(contentType) ? formats[contentType].ext : 'bin');

// Uploads are occasional and each image is seen once: libvips' operation cache would only hold memory.
sharp.cache(false);

const kindSchema = z
	.enum(photos.photoKinds, { error: 'The kind of photo is damage, finished or work' })
	.default('work');

const megabytes = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(0)} MB`;
const tooLarge = () =>
	new ApiError(
		413,
		'too_large',
		`The photo is too large: at most ${megabytes(MAX_PHOTO_BYTES)}. Take it again at a lower resolution.`
	);
const wrongType = () =>
	new ApiError(415, 'unsupported_photo_type', 'Only JPEG, PNG or WebP photos can be added; this file is none of them.');

interface Upload {
	bytes: Uint8Array;
	kind: photos.PhotoKind;
}

/** The request's headers say multipart and not certainly too large (nothing read yet). */
function checkHeaders(request: Request): void {
	const type = request.headers.get('content-type') ?? '';
	if (!/^multipart\/form-data\s*;/i.test(type)) {
		throw new ApiError(
			415,
			'unsupported_media_type',
			'Send the photo as multipart/form-data, in a file field named "photo".'
		);
	}
	const declared = Number(request.headers.get('content-length'));
	if (Number.isFinite(declared) && declared > MAX_PHOTO_BYTES + FORM_OVERHEAD_BYTES) throw tooLarge();
}

/** Reads the multipart body: its `photo` file (size checked) and optional `kind`. */
async function readUpload(request: Request): Promise<Upload> {
	let form: FormData;
	try {
		form = await request.formData();
	} catch (e) {
		// adapter-node stops reading at BODY_SIZE_LIMIT with a 413 error of its own.
		const status = (e as { status?: number })?.status ?? (e as { cause?: { status?: number } })?.cause?.status;
		if (status === 413 || /BODY_SIZE_LIMIT|exceeds limit/i.test(String(e))) throw tooLarge();
		throw new ApiError(400, 'invalid_upload', 'The upload could not be read. Choose the photo again and retry.');
	}
	const file = form.get('photo');
	if (file === null || typeof file === 'string') {
		throw new ApiError(400, 'no_photo', 'Choose or take a photo first (a file field named "photo").');
	}
	if (file.size === 0) throw new ApiError(400, 'empty_photo', 'The photo is empty (0 bytes). Take it again.');
	if (file.size > MAX_PHOTO_BYTES) throw tooLarge();
	const kindValue = form.get('kind');
	const kind = parse(kindSchema, typeof kindValue === 'string' && kindValue !== '' ? kindValue : undefined);
	return { bytes: new Uint8Array(await file.arrayBuffer()), kind };
}

interface Clean {
	bytes: Uint8Array;
	contentType: PhotoType;
}

/** The type by its magic bytes, then our own re-encoding in the same format, without metadata. */
async function reencode(input: Uint8Array): Promise<Clean> {
	// sharp also decodes SVG, TIFF, GIF, HEIF…: only what the magic bytes say is JPEG, PNG or WebP goes near it.
	const detected = await fileTypeFromBuffer(input);
	if (!isPhotoType(detected?.mime)) throw wrongType();
	const contentType = detected.mime;
	try {
		const image = sharp(input, { limitInputPixels: MAX_PHOTO_PIXELS });
		// The decoder must agree with the magic bytes (a file can look like one format and be read as another).
		const { format } = await image.metadata();
		if (format !== formats[contentType].sharp) throw wrongType();
		// rotate() with no angle applies the EXIF orientation, so the picture stands up once the EXIF is gone.
		const pipeline = image.rotate();
		if (contentType === 'image/jpeg') pipeline.jpeg({ quality: 85 });
		else if (contentType === 'image/png') pipeline.png();
		else pipeline.webp({ quality: 85 });
		// No keepMetadata()/withMetadata(): sharp writes no EXIF, XMP, IPTC or ICC data.
		const bytes = new Uint8Array(await pipeline.toBuffer());
		return { bytes, contentType };
	} catch (e) {
		if (e instanceof ApiError) throw e;
		if (/pixel limit/i.test(String(e))) {
			throw new ApiError(
				422,
				'photo_too_large',
				`The photo has too many pixels (at most ${MAX_PHOTO_PIXELS / 1_000_000} megapixels). Take it at a lower resolution.`
			);
		}
		throw new ApiError(
			422,
			'unreadable_photo',
			'The photo could not be read; the file may be damaged or cut short. Take it again.'
		);
	}
}

function storageDown(e: unknown): never {
	if (e instanceof storage.StorageUnavailable) {
		log.error({ reason: e.message }, 'photo storage unavailable');
		throw new ApiError(
			503,
			'storage_unavailable',
			'Photo storage is not answering. Try again in a minute.',
			undefined,
			{
				'retry-after': '30'
			}
		);
	}
	throw e;
}

/** Adds a photo to a wheel from an upload request. */
export async function add(actor: Actor, wheelId: number, request: Request): Promise<photos.PhotoView> {
	checkHeaders(request);
	await photos.checkMayAdd(actor, wheelId);
	const upload = await readUpload(request);
	const clean = await reencode(upload.bytes);
	const objectKey = `stores/${actor.storeId}/photos/${randomUUID()}.${formats[clean.contentType].ext}`;
	await storage.put(objectKey, clean.bytes, clean.contentType).catch(storageDown);
	try {
		return await photos.create(actor, wheelId, {
			objectKey,
			contentType: clean.contentType,
			sizeBytes: clean.bytes.byteLength,
			kind: upload.kind
		});
	} catch (e) {
		// No row, no object: nothing else would ever point at it.
		await storage
			.remove(objectKey)
			.catch((error) => log.error({ objectKey, err: errorDetails(error) }, 'photo object left behind'));
		throw e;
	}
}

export const listForWheel = photos.listForWheel;

/** A photo's bytes and how to serve them, for the actor's store only. */
export async function open(
	actor: Actor,
	photoId: number
): Promise<{ photo: photos.PhotoView; bytes: Uint8Array<ArrayBuffer>; filename: string }> {
	const { objectKey, ...photo } = await photos.read(actor, photoId);
	const bytes = await storage.get(objectKey).catch(storageDown);
	if (!bytes) throw new NotFound('The photo is recorded but its file is missing from storage.');
	return { photo, bytes, filename: `photo-${photo.id}.${extensionOf(photo.contentType)}` };
}

// Object storage through the AWS S3 SDK, so any S3-compatible store works: AWS itself, MinIO, or the local fake
// (s3rver) that `npm start` and `npm test` run. One client per app instance, created on first use. Objects are
// addressed by key only; what a key means (whose photo, which store) is the caller's business.
import {
	DeleteObjectCommand,
	GetObjectCommand,
	ListObjectsV2Command,
	NoSuchKey,
	PutObjectCommand,
	S3Client,
	S3ServiceException
} from '@aws-sdk/client-s3';
import { config } from './config';

let client: S3Client | undefined;

function s3(): S3Client {
	if (client) return client;
	// The SDK warns on every start that later releases will need Node 22; that is known (../shared/STACK.md).
	process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= 'true';
	const { S3_ENDPOINT, S3_REGION, S3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY } = config();
	client = new S3Client({
		endpoint: S3_ENDPOINT,
		region: S3_REGION,
		credentials: { accessKeyId: S3_ACCESS_KEY_ID, secretAccessKey: S3_SECRET_ACCESS_KEY },
		// Bucket in the path, not the host name: works with local and self-hosted stores as well as AWS.
		forcePathStyle: true,
		// Otherwise the SDK sends uploads with chunked checksum framing, which S3-compatible stores such as s3rver
		// keep as part of the object.
		requestChecksumCalculation: 'WHEN_REQUIRED',
		responseChecksumValidation: 'WHEN_REQUIRED',
		// A store that does not answer must not hold a request (and its upload in memory) for long.
		maxAttempts: 2,
		requestHandler: { connectionTimeout: 3000, requestTimeout: 20_000 }
	});
	return client;
}

const bucket = () => config().S3_BUCKET;

/** The store could not be reached or refused the request: the caller answers 503, not 500. */
export class StorageUnavailable extends Error {}

async function call<T>(work: () => Promise<T>): Promise<T> {
	try {
		return await work();
	} catch (e) {
		if (e instanceof NoSuchKey) throw e;
		const detail = e instanceof S3ServiceException ? `${e.name}: ${e.message}` : String(e);
		throw new StorageUnavailable(`Photo storage did not answer as expected (${detail}).`, { cause: e });
	}
}

export async function put(key: string, body: Uint8Array, contentType: string): Promise<void> {
	await call(() =>
		s3().send(
			new PutObjectCommand({
				Bucket: bucket(),
				Key: key,
				Body: body,
				ContentType: contentType,
				ContentLength: body.byteLength
			})
		)
	);
}

/** The object's bytes, or null when there is no such key. */
export async function get(key: string): Promise<Uint8Array<ArrayBuffer> | null> {
	try {
		const result = await call(() => s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key })));
		if (!result.Body) return new Uint8Array();
		// Read into ordinary (not shared) memory; the SDK's type only says "some ArrayBuffer".
		return (await result.Body.transformToByteArray()) as Uint8Array<ArrayBuffer>;
	} catch (e) {
		if (e instanceof NoSuchKey) return null;
		throw e;
	}
}

/** Deletes the object; deleting a key that is not there is not an error (S3's own rule). */
export async function remove(key: string): Promise<void> {
	await call(() => s3().send(new DeleteObjectCommand({ Bucket: bucket(), Key: key })));
}

/** Every key under a prefix (paged through the store's 1,000-key pages). */
export async function list(prefix: string): Promise<string[]> {
	const keys: string[] = [];
	let token: string | undefined;
	do {
		const page = await call(() =>
			s3().send(new ListObjectsV2Command({ Bucket: bucket(), Prefix: prefix, ContinuationToken: token }))
		);
		for (const o of page.Contents ?? []) if (o.Key) keys.push(o.Key);
		token = page.IsTruncated ? page.NextContinuationToken : undefined;
	} while (token);
	return keys;
}

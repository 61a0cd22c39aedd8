// Photos through the built app and the tests' S3 fake: what is accepted is checked by content and stored as our own
// re-encoding without camera metadata; what is refused leaves no object behind; another store's staff cannot see
// a photo or even that the wheel exists. Test images are made with sharp here; there are no binary fixtures.
import { spawn, type ChildProcess } from 'node:child_process';
import { DeleteObjectCommand, ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withClient } from '../support/database';
import { client, signIn, startInstances, stopInstances, testS3, type Instance } from '../support/instances';
import { createTestStore, newJob, type TestStore } from '../support/store';

const MAX_BYTES = 10 * 1024 * 1024; // src/lib/server/photos.ts, MAX_PHOTO_BYTES

let instance: Instance;
let store: TestStore;
let other: TestStore;
let fake: ChildProcess | undefined;
const cookies: Record<string, string> = {};
/** A wheel of store A in bay 1, where store A's first technician works. */
let wheelId: number;

process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= 'true';
const s3 = new S3Client({
	endpoint: testS3.endpoint,
	region: testS3.region,
	credentials: { accessKeyId: testS3.accessKeyId, secretAccessKey: testS3.secretAccessKey },
	forcePathStyle: true,
	requestChecksumCalculation: 'WHEN_REQUIRED',
	responseChecksumValidation: 'WHEN_REQUIRED'
});

async function objectKeys(): Promise<string[]> {
	const keys: string[] = [];
	let token: string | undefined;
	do {
		const page = await s3.send(new ListObjectsV2Command({ Bucket: testS3.bucket, ContinuationToken: token }));
		keys.push(...(page.Contents ?? []).map((o) => o.Key!));
		token = page.IsTruncated ? page.NextContinuationToken : undefined;
	} while (token);
	return keys;
}

/** `npm test` runs the tests' S3 fake; run by hand, this file starts one itself when none answers. */
async function ensureFake(): Promise<void> {
	const answers = await fetch(testS3.endpoint).then(
		() => true,
		() => false
	);
	if (answers) return;
	const url = new URL(testS3.endpoint);
	if (!['127.0.0.1', 'localhost'].includes(url.hostname)) throw new Error(`${testS3.endpoint} does not answer`);
	const child = spawn(process.execPath, ['scripts/s3-fake.mjs', '--test'], {
		env: { ...process.env, LUGLINE_TEST_S3_PORT: url.port },
		stdio: ['ignore', 'pipe', 'pipe']
	});
	fake = child;
	await new Promise<void>((resolve, reject) => {
		let errors = '';
		child.stderr!.on('data', (d) => (errors += d));
		child.stdout!.on('data', (d) => String(d).includes('s3 fake ready') && resolve());
		child.once('exit', (code) => reject(new Error(`the S3 fake exited (${code}): ${errors}`)));
	});
}

beforeAll(async () => {
	await ensureFake();
	store = await createTestStore(`photos-${process.pid}`);
	other = await createTestStore(`photos-other-${process.pid}`);
	[instance] = await startInstances([3211]);
	for (const key of ['lead', 'writer', 'tech', 'tech2', 'manager'] as const) {
		cookies[key] = await signIn(instance.url, store.people[key].email, store.people[key].password);
	}
	cookies.otherLead = await signIn(instance.url, other.people.lead.email, other.people.lead.password);
	cookies.otherManager = await signIn(instance.url, other.people.manager.email, other.people.manager.password);

	const writer = client(instance.url, cookies.writer);
	const job = await writer.call('POST', '/api/jobs', newJob({ wheels: ['LF'] }));
	expect(job.status, JSON.stringify(job.body)).toBe(201);
	const wheel = job.body.wheels[0];
	const moved = await client(instance.url, cookies.lead).call('PATCH', `/api/wheels/${wheel.id}`, {
		version: wheel.version,
		bayId: store.bays[0].id
	});
	expect(moved.status, JSON.stringify(moved.body)).toBe(200);
	wheelId = wheel.id;
}, 60_000);

afterAll(async () => {
	await stopInstances(instance ? [instance] : []);
	// What this file stored is debris in the tests' own bucket (`npm test` starts it empty); removing it keeps the
	// folder small when the file is run again and again by hand.
	if (store) {
		const keys = (await objectKeys().catch(() => [])).filter((k) => k.startsWith(`stores/${store.id}/`));
		await Promise.all(keys.map((Key) => s3.send(new DeleteObjectCommand({ Bucket: testS3.bucket, Key }))));
	}
	if (fake && fake.exitCode === null) {
		const exited = new Promise((done) => fake!.once('exit', done));
		fake.kill('SIGTERM');
		await exited;
	}
});

interface Sent {
	status: number;
	body: any;
}

/** Uploads like the bay screen does: multipart/form-data with a `photo` file and an optional `kind`. */
async function upload(
	who: string,
	bytes: Uint8Array,
	name: string,
	type: string,
	options: { kind?: string; wheel?: number } = {}
): Promise<Sent> {
	const form = new FormData();
	form.set('photo', new Blob([bytes as Uint8Array<ArrayBuffer>], { type }), name);
	if (options.kind) form.set('kind', options.kind);
	const response = await fetch(`${instance.url}/api/wheels/${options.wheel ?? wheelId}/photos`, {
		method: 'POST',
		headers: { origin: instance.url, ...(cookies[who] ? { cookie: cookies[who] } : {}) },
		body: form
	});
	const text = await response.text();
	let body: unknown = text;
	try {
		body = JSON.parse(text);
	} catch {
		// not JSON; keep the text so a failure shows it
	}
	return { status: response.status, body };
}

async function download(who: string, url: string) {
	const response = await fetch(`${instance.url}${url}`, { headers: { cookie: cookies[who] } });
	return { response, bytes: new Uint8Array(await response.arrayBuffer()) };
}

const photoRows = (wheel: number) =>
	withClient(async (c) =>
		Number((await c.query('SELECT count(*) FROM photos WHERE wheel_id = $1', [wheel])).rows[0].count)
	);

const image = (format: 'jpeg' | 'png' | 'webp' | 'gif', width = 64, height = 48) =>
	sharp({ create: { width, height, channels: 3, background: { r: 200, g: 40, b: 40 } } })
		.toFormat(format)
		.toBuffer();

/** A refused upload: the status and code, a message in words, and neither an object nor a row left behind. */
async function expectRefused(sent: () => Promise<Sent>, status: number, code: string) {
	const keysBefore = await objectKeys();
	const rowsBefore = await photoRows(wheelId);
	const r = await sent();
	expect(r.status, JSON.stringify(r.body)).toBe(status);
	expect(r.body.code).toBe(code);
	expect(typeof r.body.message).toBe('string');
	expect(r.body.message.length).toBeGreaterThan(10);
	expect(await objectKeys()).toEqual(keysBefore);
	expect(await photoRows(wheelId)).toBe(rowsBefore);
	return r;
}

describe('accepted photos', () => {
	it('a JPEG is stored and read back through the app with safe headers', async () => {
		const before = await objectKeys();
		const jpeg = await image('jpeg');
		const r = await upload('tech', jpeg, 'wheel.jpg', 'image/jpeg');
		expect(r.status, JSON.stringify(r.body)).toBe(201);
		expect(r.body).toEqual({
			id: expect.any(Number),
			kind: 'work',
			contentType: 'image/jpeg',
			sizeBytes: expect.any(Number),
			createdAt: expect.any(String),
			url: `/api/photos/${r.body.id}`
		});
		const after = await objectKeys();
		expect(after).toHaveLength(before.length + 1);
		const key = after.find((k) => !before.includes(k))!;
		expect(key).toMatch(new RegExp(`^stores/${store.id}/photos/[0-9a-f-]{36}\\.jpg$`));

		const { response, bytes } = await download('tech', r.body.url);
		expect(response.status).toBe(200);
		expect(response.headers.get('content-type')).toBe('image/jpeg');
		expect(response.headers.get('content-disposition')).toBe(`inline; filename="photo-${r.body.id}.jpg"`);
		expect(response.headers.get('x-content-type-options')).toBe('nosniff');
		expect(response.headers.get('cache-control')).toBe('private, max-age=3600');
		expect(bytes.byteLength).toBe(r.body.sizeBytes);
		const meta = await sharp(bytes).metadata();
		expect(meta).toMatchObject({ format: 'jpeg', width: 64, height: 48 });

		// The screens hear of it: an event on the wheel with the wheel's view, and who did it in the audit.
		const trail = await withClient(async (c) => ({
			event: (
				await c.query(`SELECT entity, payload FROM events WHERE type = 'photo.added' AND entity_id = $1`, [wheelId])
			).rows,
			audit: (await c.query(`SELECT user_id, detail FROM audit WHERE action = 'photo' AND entity_id = $1`, [wheelId]))
				.rows
		}));
		expect(trail.event).toHaveLength(1);
		expect(trail.event[0].entity).toBe('wheel');
		expect(trail.event[0].payload.wheels.map((w: { id: number }) => w.id)).toEqual([wheelId]);
		expect(trail.audit[0]).toMatchObject({ user_id: store.people.tech.id, detail: { photo: r.body.id } });
	});

	it('a PNG is stored as PNG, with its kind', async () => {
		const r = await upload('lead', await image('png'), 'rim.png', 'image/png', { kind: 'damage' });
		expect(r.status, JSON.stringify(r.body)).toBe(201);
		expect(r.body).toMatchObject({ kind: 'damage', contentType: 'image/png' });
		const { response, bytes } = await download('manager', r.body.url);
		expect(response.status).toBe(200);
		expect(response.headers.get('content-type')).toBe('image/png');
		expect(response.headers.get('content-disposition')).toBe(`inline; filename="photo-${r.body.id}.png"`);
		expect(response.headers.get('x-content-type-options')).toBe('nosniff');
		expect((await sharp(bytes).metadata()).format).toBe('png');
	});

	it('a WebP is accepted', async () => {
		const r = await upload('manager', await image('webp'), 'done.webp', 'image/webp', { kind: 'finished' });
		expect(r.status, JSON.stringify(r.body)).toBe(201);
		expect(r.body).toMatchObject({ kind: 'finished', contentType: 'image/webp' });
	});

	it('a PNG named .jpg and sent as image/jpeg is judged by its content and stored as PNG', async () => {
		const r = await upload('tech', await image('png'), 'looks-like.jpg', 'image/jpeg');
		expect(r.status, JSON.stringify(r.body)).toBe(201);
		expect(r.body.contentType).toBe('image/png');
		const { response, bytes } = await download('tech', r.body.url);
		expect(response.headers.get('content-type')).toBe('image/png');
		expect(response.headers.get('content-disposition')).toBe(`inline; filename="photo-${r.body.id}.png"`);
		expect((await sharp(bytes).metadata()).format).toBe('png');
	});

	it('camera metadata is gone after the re-encoding, and the EXIF orientation is applied', async () => {
		// 64×48 as stored by a camera held on its side (orientation 6: turn 90° clockwise to view), with EXIF tags.
		const original = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#4080c0' } })
			.jpeg()
			.withExif({ IFD0: { Make: 'Invented Camera Co', Model: 'Test 1', Copyright: 'Invented for a test' } })
			.withMetadata({ orientation: 6 })
			.toBuffer();
		const sent = await sharp(original).metadata();
		expect(sent.exif).toBeDefined();
		expect(sent.orientation).toBe(6);

		const r = await upload('tech', original, 'camera.jpg', 'image/jpeg');
		expect(r.status, JSON.stringify(r.body)).toBe(201);
		const { bytes } = await download('tech', r.body.url);
		const stored = await sharp(bytes).metadata();
		expect(stored.exif).toBeUndefined();
		expect(stored.xmp).toBeUndefined();
		expect(stored.icc).toBeUndefined();
		expect(stored.orientation).toBeUndefined();
		expect(Buffer.from(bytes).includes('Invented Camera Co')).toBe(false);
		// Upright now: the picture itself was turned.
		expect({ width: stored.width, height: stored.height }).toEqual({ width: 48, height: 64 });
	});

	it('the wheel’s photos are listed for every staff member of the store, oldest first', async () => {
		const r = await client(instance.url, cookies.writer).call('GET', `/api/wheels/${wheelId}/photos`);
		expect(r.status).toBe(200);
		expect(r.body.photos.length).toBeGreaterThanOrEqual(5);
		const ids = r.body.photos.map((p: { id: number }) => p.id);
		expect(ids).toEqual([...ids].sort((a, b) => a - b));
		expect(r.body.photos[0]).toEqual({
			id: expect.any(Number),
			kind: expect.any(String),
			contentType: expect.any(String),
			sizeBytes: expect.any(Number),
			createdAt: expect.any(String),
			url: `/api/photos/${ids[0]}`
		});
		const { response } = await download('writer', r.body.photos[0].url);
		expect(response.status).toBe(200);
	});
});

describe('refused uploads leave nothing behind', () => {
	it('an SVG', async () => {
		const svg = new TextEncoder().encode(
			'<svg xmlns="http://www.w3.org/2000/svg" width="64" height="48"><script>alert(1)</script><rect width="64" height="48"/></svg>'
		);
		const r = await expectRefused(
			() => upload('tech', svg, 'damage.svg', 'image/svg+xml'),
			415,
			'unsupported_photo_type'
		);
		expect(r.body.message).toMatch(/Only JPEG, PNG or WebP photos/);
		// Also when it claims to be a JPEG.
		await expectRefused(() => upload('tech', svg, 'damage.jpg', 'image/jpeg'), 415, 'unsupported_photo_type');
	});

	it('a script renamed .jpg', async () => {
		const script = new TextEncoder().encode('#!/bin/sh\necho "not a photo"\n<script>alert(document.cookie)</script>\n');
		const r = await expectRefused(
			() => upload('tech', script, 'photo.jpg', 'image/jpeg'),
			415,
			'unsupported_photo_type'
		);
		expect(r.body.message).toMatch(/Only JPEG, PNG or WebP photos/);
	});

	it('another image type (GIF) that sharp could decode', async () => {
		const gif = await image('gif');
		await expectRefused(() => upload('tech', gif, 'anim.gif', 'image/gif'), 415, 'unsupported_photo_type');
	});

	it('a zero-byte file', async () => {
		const r = await expectRefused(
			() => upload('tech', new Uint8Array(0), 'empty.jpg', 'image/jpeg'),
			400,
			'empty_photo'
		);
		expect(r.body.message).toMatch(/empty/);
	});

	it('a file one byte over the limit, and one far over it', async () => {
		const over = new Uint8Array(MAX_BYTES + 1);
		over.set(await image('jpeg'));
		const r = await expectRefused(() => upload('tech', over, 'huge.jpg', 'image/jpeg'), 413, 'too_large');
		expect(r.body.message).toMatch(/at most 10 MB/);
		// Beyond what the app reads at all: refused from the declared length, without reading the body.
		const far = new Uint8Array(MAX_BYTES * 2);
		far.set(await image('jpeg'));
		await expectRefused(() => upload('tech', far, 'huger.jpg', 'image/jpeg'), 413, 'too_large');
	});

	it('a JPEG cut short (right magic bytes, no picture)', async () => {
		const jpeg = await image('jpeg', 640, 480);
		await expectRefused(() => upload('tech', jpeg.subarray(0, 200), 'cut.jpg', 'image/jpeg'), 422, 'unreadable_photo');
	});

	it('no photo field, an unknown kind, or a JSON body', async () => {
		const form = new FormData();
		form.set('kind', 'damage');
		const noPhoto = await fetch(`${instance.url}/api/wheels/${wheelId}/photos`, {
			method: 'POST',
			headers: { origin: instance.url, cookie: cookies.tech },
			body: form
		});
		expect(noPhoto.status).toBe(400);
		expect((await noPhoto.json()).code).toBe('no_photo');
		const kind = await expectRefused(
			async () => upload('tech', await image('jpeg'), 'x.jpg', 'image/jpeg', { kind: 'selfie' }),
			400,
			'invalid_input'
		);
		expect(kind.body.message).toMatch(/damage, finished or work/);
		const json = await client(instance.url, cookies.tech).call('POST', `/api/wheels/${wheelId}/photos`, {});
		expect(json.status).toBe(415);
	});

	it('when the row cannot be written, the stored object is deleted again', async () => {
		// Make the database refuse this one wheel's next photo, after the object has been stored.
		await withClient((c) =>
			c.query(`
				CREATE OR REPLACE FUNCTION lugline_test_refuse_photo() RETURNS trigger LANGUAGE plpgsql AS $$
				BEGIN RAISE EXCEPTION 'refused by photos.test.ts'; END $$;
				CREATE TRIGGER lugline_test_refuse_photo BEFORE INSERT ON photos FOR EACH ROW
				WHEN (NEW.wheel_id = ${Number(wheelId)}) EXECUTE FUNCTION lugline_test_refuse_photo();`)
		);
		try {
			const keysBefore = await objectKeys();
			const r = await upload('tech', await image('jpeg'), 'x.jpg', 'image/jpeg');
			// An unexpected database error: a 500 (the instance logs it), and no object without its row.
			expect(r.status).toBe(500);
			expect(await objectKeys()).toEqual(keysBefore);
		} finally {
			await withClient((c) =>
				c.query(`DROP TRIGGER IF EXISTS lugline_test_refuse_photo ON photos;
					DROP FUNCTION IF EXISTS lugline_test_refuse_photo();`)
			);
		}
	});
});

describe('who may', () => {
	let photoUrl: string;

	beforeAll(async () => {
		const r = await upload('tech', await image('jpeg'), 'mine.jpg', 'image/jpeg');
		expect(r.status).toBe(201);
		photoUrl = r.body.url;
	});

	it('another store’s staff get 404 for the photo, the wheel’s list and an upload to it', async () => {
		for (const who of ['otherLead', 'otherManager']) {
			const { response } = await download(who, photoUrl);
			expect(response.status).toBe(404);
			expect(response.headers.get('content-type')).toMatch(/json/);
			expect((await client(instance.url, cookies[who]).call('GET', `/api/wheels/${wheelId}/photos`)).status).toBe(404);
		}
		const r = await expectRefused(
			async () => upload('otherLead', await image('jpeg'), 'x.jpg', 'image/jpeg'),
			404,
			'not_found'
		);
		expect(r.body.message).toMatch(/No such wheel/);
	});

	it('a writer sees the photos but cannot add one (403)', async () => {
		expect((await download('writer', photoUrl)).response.status).toBe(200);
		const r = await expectRefused(
			async () => upload('writer', await image('jpeg'), 'x.jpg', 'image/jpeg'),
			403,
			'forbidden'
		);
		expect(r.body.message).toMatch(/may not/);
	});

	it('a technician adds photos only to wheels of their bay or that they worked', async () => {
		const r = await expectRefused(
			async () => upload('tech2', await image('jpeg'), 'x.jpg', 'image/jpeg'),
			403,
			'forbidden'
		);
		expect(r.body.message).toMatch(/technician on this wheel or its bay/);
		expect((await download('tech2', photoUrl)).response.status).toBe(200);
	});

	it('nobody signed out sees or adds anything', async () => {
		const r = await fetch(`${instance.url}${photoUrl}`);
		expect(r.status).toBe(401);
		await expectRefused(async () => upload('nobody', await image('jpeg'), 'x.jpg', 'image/jpeg'), 401, 'signed_out');
	});

	it('a photo id that does not exist is 404', async () => {
		const { response } = await download('lead', '/api/photos/2147483647');
		expect(response.status).toBe(404);
	});
});

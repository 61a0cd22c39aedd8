// The photos of a wheel: rows that point at objects in photo storage (src/lib/server/storage.ts). Anyone on the
// store's staff may see them; technicians (for a wheel of their bay or one they worked), leads and managers add them.
// Adding one is an event, so every screen showing the wheel hears of it. The upload itself, its checks and the
// object are src/lib/server/photos.ts's business.
import type { Knex } from 'knex';
import { Forbidden, NotFound } from '../errors';
import * as events from '../live/events';
import { leads, type Actor } from './actor';
import * as audit from './audit';
import { inTransaction } from './transaction';
import { wheelViews } from './views';
import { db } from './index';

import { photoKinds, type PhotoKind, type PhotoView } from '$lib/schemas/photos';

export { photoKinds, type PhotoKind, type PhotoView };

/** A stored photo's row, with what serving it needs. */
export interface PhotoObject extends PhotoView {
	objectKey: string;
}

const viewOf = (r: Record<string, unknown>): PhotoObject => ({
	id: Number(r.id),
	kind: r.kind as PhotoKind,
	contentType: String(r.content_type),
	sizeBytes: Number(r.size_bytes),
	createdAt: new Date(r.created_at as string).toISOString(),
	url: `/api/photos/${r.id}`,
	objectKey: String(r.object_key)
});

const publicView = ({ objectKey: _key, ...view }: PhotoObject): PhotoView => view;

interface WheelRow {
	id: number;
	job_id: number;
	tech_id: number | null;
	bay_tech_id: number | null;
}

/** The wheel, if it is in the actor's store (another store's wheel is "not found"). */
async function wheelIn(q: Knex | Knex.Transaction, actor: Actor, wheelId: number): Promise<WheelRow> {
	// No row lock: the photo's foreign keys hold the job and the wheel (in that order, as DEVELOPERS.md's lock
	// order wants) until the commit, and a photo does not depend on the wheel's state.
	const row = await q('wheels as w')
		.join('jobs as j', 'j.id', 'w.job_id')
		.leftJoin('bays as b', 'b.id', 'w.bay_id')
		.select('w.id', 'w.job_id', 'w.tech_id', 'j.store_id', 'b.tech_id as bay_tech_id')
		.where('w.id', wheelId)
		.first();
	if (!row || row.store_id !== actor.storeId) throw new NotFound('No such wheel in your store.');
	return row as WheelRow;
}

/** The same rule as the wheel record (src/lib/server/db/records.ts): whoever may record a wheel may photograph it. */
function mayAdd(actor: Actor, wheel: WheelRow): void {
	if (leads(actor)) return;
	if (actor.role !== 'tech') throw new Forbidden('Only technicians, leads and managers add photos.');
	if (wheel.tech_id !== actor.userId && wheel.bay_tech_id !== actor.userId) {
		throw new Forbidden('Only the technician on this wheel or its bay, a lead or a manager adds its photos.');
	}
}

/** Refuses (404/403) before an upload is read, so nobody's photo is processed for nothing. */
export async function checkMayAdd(actor: Actor, wheelId: number): Promise<void> {
	mayAdd(actor, await wheelIn(db(), actor, wheelId));
}

export interface NewPhoto {
	objectKey: string;
	contentType: string;
	sizeBytes: number;
	kind: PhotoKind;
}

/** Records a photo whose object is already stored; the rules are checked again inside the transaction. */
export async function create(actor: Actor, wheelId: number, photo: NewPhoto): Promise<PhotoView> {
	return inTransaction(async (trx) => {
		const wheel = await wheelIn(trx, actor, wheelId);
		mayAdd(actor, wheel);
		const [row] = await trx('photos')
			.insert({
				store_id: actor.storeId,
				job_id: wheel.job_id,
				wheel_id: wheelId,
				object_key: photo.objectKey,
				content_type: photo.contentType,
				size_bytes: photo.sizeBytes,
				kind: photo.kind,
				uploaded_by: actor.userId
			})
			.returning('*');
		const view = viewOf(row);
		await audit.record(trx, actor, 'photo', 'wheel', wheelId, {
			photo: view.id,
			kind: view.kind,
			contentType: view.contentType,
			sizeBytes: view.sizeBytes
		});
		await events.append(trx, {
			storeId: actor.storeId,
			type: 'photo.added',
			entity: 'wheel',
			entityId: wheelId,
			wheels: await wheelViews(trx, [wheelId])
		});
		return publicView(view);
	});
}

/** The wheel's photos, oldest first. */
export async function listForWheel(actor: Actor, wheelId: number): Promise<PhotoView[]> {
	await wheelIn(db(), actor, wheelId);
	const rows = await db()('photos').where({ wheel_id: wheelId, store_id: actor.storeId }).orderBy(['created_at', 'id']);
	return rows.map((r) => publicView(viewOf(r)));
}

/** One photo of the actor's store, with its object key. */
export async function read(actor: Actor, photoId: number): Promise<PhotoObject> {
	const row = await db()('photos').where({ id: photoId, store_id: actor.storeId }).first();
	if (!row) throw new NotFound('No such photo in your store.');
	return viewOf(row);
}

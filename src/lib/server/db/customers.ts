// Customers of one store: the fuzzy search behind the palette and intake (pg_trgm), by name, phone fragment or plate.
import type { CustomerHit } from '$lib/schemas/customers';
import { db } from './index';

/**
 * Names match by trigram similarity (typos and word order forgiven); a query with three or more digits also matches
 * phone numbers containing those digits; a query of letters and digits matches plates with the space left out.
 */
export async function search(storeId: number, query: string, limit = 20): Promise<CustomerHit[]> {
	const text = query.trim().toLowerCase();
	const digits = text.replace(/\D/g, '');
	const plate = text.replace(/\s/g, '').toUpperCase();
	const { rows } = await db().raw(
		`WITH name_hits AS (
		   SELECT id, greatest(similarity(lower(name), :text), word_similarity(:text, lower(name))) AS score
		     FROM customers WHERE store_id = :store AND (lower(name) % :text OR :text <% lower(name) OR lower(name) LIKE '%' || :text || '%')
		 ), phone_hits AS (
		   SELECT id, 0.9 AS score FROM customers
		    WHERE store_id = :store AND length(:digits) >= 3 AND regexp_replace(phone, '\\D', '', 'g') LIKE '%' || :digits || '%'
		 ), plate_hits AS (
		   SELECT c.id, 0.95 AS score FROM customer_vehicles cv JOIN customers c ON c.id = cv.customer_id
		    WHERE c.store_id = :store AND length(:plate) >= 2 AND upper(regexp_replace(cv.plate, '\\s', '', 'g')) LIKE '%' || :plate || '%'
		 ), best AS (
		   SELECT id, max(score) AS score FROM (SELECT * FROM name_hits UNION ALL SELECT * FROM phone_hits UNION ALL SELECT * FROM plate_hits) h
		    GROUP BY id ORDER BY max(score) DESC, id LIMIT :limit
		 )
		 SELECT c.id, c.name, c.phone, c.email, b.score,
		        coalesce(json_agg(json_build_object('id', cv.id, 'plate', cv.plate, 'vehicleId', cv.vehicle_id,
		          'label', CASE WHEN v.id IS NULL THEN NULL ELSE concat_ws(' ', v.year_from || '–' || v.year_to, v.make, v.model) END)
		          ORDER BY cv.id) FILTER (WHERE cv.id IS NOT NULL), '[]') AS vehicles
		   FROM best b JOIN customers c ON c.id = b.id
		   LEFT JOIN customer_vehicles cv ON cv.customer_id = c.id
		   LEFT JOIN vehicles v ON v.id = cv.vehicle_id
		  GROUP BY c.id, b.score ORDER BY b.score DESC, c.id`,
		{ text, digits, plate, store: storeId, limit }
	);
	return rows.map((r: CustomerHit) => ({ ...r, score: Number(r.score) }));
}

import { error, json } from '@sveltejs/kit';
import { requireMember } from '$lib/server/auth/guard';
import * as map from '$lib/server/map/data';
import type { RequestHandler } from './$types';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** One cell's figures season by season (?field=<id>&col=C&row=R). */
export const GET: RequestHandler = async (event) => {
	const actor = await requireMember(event, { api: true });
	const p = event.url.searchParams;
	const field = p.get('field') ?? '';
	const col = p.get('col') ?? '';
	const row = p.get('row') ?? '';
	if (!UUID.test(field)) error(400, `field must be a field id, got “${field}”.`);
	if (!/^\d+$/.test(col) || !/^\d+$/.test(row)) error(400, `col and row must be whole numbers from 0, got col “${col}”, row “${row}”.`);
	const history = await map.cellHistory(actor, field, Number(col), Number(row));
	if (!history) error(404, 'No such cell in a field you may see.');
	return json(history, { headers: { 'cache-control': 'private, no-store' } });
};

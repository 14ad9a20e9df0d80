// Reading the pre-rendered cells pyramid (see pyramid-render.ts): one indexed lookup per tile.
import { sql, type SQL } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { datasetKey, type Dataset } from './dataset';
import { TILE_FORMAT, type EncodedTile } from './tiles';

/**
 * The stored tile of the farm's pyramid for this dataset at its current data version, or
 * null when there is no such set (still rendering, or never rendered) and the caller must draw it
 * live. A tile the set lacks is empty: the answer is then a tile with no body. One query, the
 * version included, so that the common request costs one round trip after the session.
 */
export async function storedTile(farmId: string, dataset: Dataset, z: number, x: number, y: number): Promise<EncodedTile | null> {
	const rows = await db.execute<{ id: string; min_zoom: number; max_zoom: number; body: Buffer | null }>(sql`
		select s.id, s.min_zoom, s.max_zoom, t.body
		from map_tile_sets s left join map_tiles t on t.set_id = s.id and t.z = ${z} and t.x = ${x} and t.y = ${y}
		where s.farm_id = ${farmId} and s.dataset = ${datasetKey(dataset)} and s.version = ${storedVersionSql(sql`${farmId}::uuid`, seasonsOf(dataset))}
		order by s.created_at desc limit 1`);
	const set = rows[0];
	if (!set || z < set.min_zoom || z > set.max_zoom) return null;
	// The set id names the bytes: a new set is a new id, so the ETag moves with the data.
	return { body: set.body, etag: `"p-${set.id}-${z}-${x}-${y}"` };
}

/** The seasons a dataset draws on, as a condition on applications.season. */
export function seasonsOf(d: Dataset): SQL {
	if (d.kind === 'season') return sql`season = ${d.season}`;
	if (d.kind === 'compare') return sql`season in (${d.earlier}, ${d.later})`;
	throw new Error('pyramid: single applications are not pre-rendered');
}

/**
 * The version a set is stored under, as SQL text: the tile format; of its seasons' applications
 * the sum of their computation times (not the latest: a recomputation committed late with an
 * earlier time still counts), their count and their fields' grids; and the farm's threshold. New
 * results for one season leave the other seasons' tiles be; renaming a field, or adding one
 * without results, changes no tile and draws nothing again.
 */
export function storedVersionSql(farmId: SQL, seasons: SQL): SQL {
	const grid = sql`(f.id || ':' || f.grid_proj || ':' || f.grid_cell_m || ':' || f.grid_origin_x || ':' || f.grid_origin_y || ':' || f.grid_cols || ':' || f.grid_rows)`;
	return sql`(${`${TILE_FORMAT}|`} ||
		(select coalesce(sum(extract(epoch from a.computed_at))::text, '-') || '/' || count(*) || '/' ||
			coalesce(md5(string_agg(distinct ${grid}, ',' order by ${grid})), '')
			from applications a join fields f on f.id = a.field_id where a.farm_id = ${farmId} and ${seasons}) || '/' ||
		(select hotspot_threshold_percent::text from farms where id = ${farmId}))`;
}

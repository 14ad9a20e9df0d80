// A field year over year: per season the percent sprayed and the chemical saved, the hotspot
// area, and for each pair of consecutive seasons the persistent, new and cleared hotspots (the
// map's definitions: summary() in ./map/data.ts at the farm's saved threshold); plus one small
// map per season from the same cells the map's tiles draw (cellRows).
import { sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { may, type Actor } from '$lib/server/auth/guard';
import * as figures from '$lib/server/figures';
import { blockAlign, cellRows, summary } from '$lib/server/map/data';
import type { Field } from '$lib/server/db/schema';
import { projectRings } from '$lib/geo/projection';
import { smallMultiple, spanFor, type SmallMultiple } from '$lib/map/small-multiple';

export type SeasonTrend = {
	season: number;
	applications: number;
	coveredM2: number;
	sprayedM2: number;
	/** Sprayed over covered area, all applications of the season, 0..100. */
	sprayedPercent: number | null;
	/** Liquid (and so product) saved against broadcast: 1 - volume / (covered x carrier rate), 0..100. */
	savedPercent: number | null;
	/** Money saved over the season's products; null without prices or for roles that see none. */
	savedCost: number | null;
	hotspots: number;
	hotspotAreaM2: number;
};

export type PairTrend = {
	earlier: number;
	later: number;
	persistent: number;
	new: number;
	cleared: number;
	persistentAreaM2: number;
	newAreaM2: number;
	clearedAreaM2: number;
};

export type FieldTrend = { seasons: SeasonTrend[]; pairs: PairTrend[]; thresholdPercent: number };

/** Per season of one field, oldest first: the sprayed share and chemical saved, without hotspots. */
export type SeasonShares = Omit<SeasonTrend, 'hotspots' | 'hotspotAreaM2'>;

/**
 * The field's seasons, oldest first, as the year-over-year chart gives them; the season summary
 * reads the same numbers. `field` must be one the actor may see (fields.get).
 */
export async function seasonShares(actor: Actor, field: Pick<Field, 'id'>): Promise<SeasonShares[]> {
	const apps = await figures.listApplications(actor, { fieldId: field.id });
	const bySeason = figures.bySeason(apps).sort((a, b) => a.season - b.season);
	// The broadcast-equivalent liquid needs each application's carrier rate.
	const liquid = await db.execute<{ season: number; volume: number; broadcast: number }>(sql`
		select a.season, sum(a.volume_l) as volume, sum(a.covered_m_2 * m.carrier_rate_l_per_m_2) as broadcast
		from applications a join tank_mixes m on m.id = a.tank_mix_id
		where a.farm_id = ${actor.farm.id} and a.field_id = ${field.id}
		group by a.season`);
	const seesPrices = may(actor.role, 'prices.view');
	return bySeason.map((s) => {
		const l = liquid.find((x) => x.season === s.season);
		const costs = s.products.map((p) => p.savedCost);
		return {
			season: s.season,
			applications: s.applications,
			coveredM2: s.coveredM2,
			sprayedM2: s.sprayedM2,
			sprayedPercent: s.coveredM2 > 0 ? (100 * s.sprayedM2) / s.coveredM2 : null,
			savedPercent: l && l.broadcast > 0 ? 100 * (1 - l.volume / l.broadcast) : null,
			savedCost: seesPrices && costs.length && costs.every((c) => c !== null) ? costs.reduce((a, c) => a + c!, 0) : null
		};
	});
}

/** The field's seasons, oldest first. `field` must be one the actor may see (fields.get). */
export async function fieldTrend(actor: Actor, field: Pick<Field, 'id'>): Promise<FieldTrend> {
	const bySeason = await seasonShares(actor, field);
	// Consecutive pairs compared with the map's summary; each season's own hotspots follow from
	// them (later = persistent + new, earlier = persistent + cleared), so a lone season alone needs
	// a season summary of its own.
	const order = bySeason.map((s) => s.season);
	const pairs: PairTrend[] = [];
	for (let i = 1; i < order.length; i++) {
		const earlier = order[i - 1], later = order[i];
		const c = (await summary(actor, { dataset: { kind: 'compare', earlier, later }, thresholdPercent: null }, { fieldIds: [field.id] })).compare!;
		pairs.push({ earlier, later, persistent: c.persistent, new: c.new, cleared: c.cleared, persistentAreaM2: c.persistentAreaM2, newAreaM2: c.newAreaM2, clearedAreaM2: c.clearedAreaM2 });
	}
	const hotspotsOf = async (i: number): Promise<{ hotspots: number; hotspotAreaM2: number }> => {
		if (i > 0) return { hotspots: pairs[i - 1].persistent + pairs[i - 1].new, hotspotAreaM2: pairs[i - 1].persistentAreaM2 + pairs[i - 1].newAreaM2 };
		if (pairs.length) return { hotspots: pairs[0].persistent + pairs[0].cleared, hotspotAreaM2: pairs[0].persistentAreaM2 + pairs[0].clearedAreaM2 };
		const one = await summary(actor, { dataset: { kind: 'season', season: order[0] }, thresholdPercent: null }, { fieldIds: [field.id] });
		return { hotspots: one.hotspots, hotspotAreaM2: one.hotspotAreaM2 };
	};
	const seasons: SeasonTrend[] = [];
	for (const [i, s] of bySeason.entries()) seasons.push({ ...s, ...(await hotspotsOf(i)) });
	const [farm] = await db.execute<{ t: number }>(sql`select hotspot_threshold_percent as t from farms where id = ${actor.farm.id}`);
	return { seasons, pairs, thresholdPercent: farm?.t ?? 20 };
}

/** One small map per season (oldest first), all at the same span so they compare block for block. */
export async function smallMultiples(
	actor: Actor,
	field: Field,
	seasons: number[],
	/** Blocks across the longer side at most: the season summary draws one map larger than the field page's. */
	{ maxBlocks = 120 }: { maxBlocks?: number } = {}
): Promise<{ span: number; maps: (SmallMultiple & { season: number })[] }> {
	const grid = { cols: field.gridCols, rows: field.gridRows, originX: field.gridOriginX, originY: field.gridOriginY, cellSizeM: field.gridCellM };
	const span = spanFor(grid, maxBlocks);
	const region = { fieldId: field.id, ...blockAlign({ col0: 0, col1: grid.cols - 1, row0: 0, row1: grid.rows - 1 }, span) };
	const rings = projectRings(field.gridProj, field.boundary);
	const maps = [];
	for (const season of [...seasons].sort((a, b) => a - b)) {
		const cells = await cellRows(actor, { kind: 'season', season }, [region], span);
		maps.push({ season, ...smallMultiple(cells.filter((c) => c.fieldId === field.id), grid, span, rings) });
	}
	return { span, maps };
}

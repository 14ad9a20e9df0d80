// The map's application-quality layer: flagged stretches of track (too fast, boom height or
// pressure outside the machine's limits, gaps in the log) of a season's or one application's
// applications, as GeoJSON. Stored simplified per application when its logs are processed.
import { and, eq, type SQL } from 'drizzle-orm';
import type { Feature, FeatureCollection, LineString } from 'geojson';
import { flagKinds, type FlagKind } from '$lib/compute/quality';
import { db } from '$lib/server/db';
import { applicationQuality, applications, fields } from '$lib/server/db/schema';
import { mayOpen, type Actor } from '$lib/server/auth/guard';
import type { Dataset } from './dataset';

export type QualityFeatureProps = { application: string; field: string; day: string; flags: number; kinds: FlagKind[]; kind: FlagKind | 'several' };

export type QualityLayer = FeatureCollection<LineString, QualityFeatureProps> & {
	/** Applications in the view with quality figures, and those without (processed before the check existed). */
	checked: number;
	unchecked: number;
};

export async function qualityLayer(actor: Actor, dataset: Dataset): Promise<QualityLayer> {
	// Where and how the sprayer drove is the farm's working data, not a landlord's (guard.ts).
	if (!mayOpen(actor.role, 'map')) throw new Error('qualityLayer: role may not open the map');
	let which: SQL;
	if (dataset.kind === 'application') which = eq(applications.id, dataset.applicationId);
	else which = eq(applications.season, dataset.kind === 'season' ? dataset.season : dataset.later);
	const rows = await db
		.select({ id: applications.id, day: applications.day, field: fields.name, segments: applicationQuality.segments })
		.from(applications)
		.innerJoin(fields, eq(fields.id, applications.fieldId))
		.leftJoin(applicationQuality, eq(applicationQuality.applicationId, applications.id))
		.where(and(eq(applications.farmId, actor.farm.id), which));
	const features: Feature<LineString, QualityFeatureProps>[] = [];
	for (const r of rows) {
		for (const run of r.segments ?? []) {
			const kinds = flagKinds(run.f);
			features.push({
				type: 'Feature',
				properties: { application: r.id, field: r.field, day: r.day, flags: run.f, kinds, kind: kinds.length === 1 ? kinds[0] : 'several' },
				geometry: { type: 'LineString', coordinates: run.c }
			});
		}
	}
	const checked = rows.filter((r) => r.segments !== null).length;
	return { type: 'FeatureCollection', features, checked, unchecked: rows.length - checked };
}

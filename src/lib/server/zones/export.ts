// The zones of a field the actor may see, as the export module wants them.
import type { Actor } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import type { ExportZone } from '$lib/geo/zone-export';
import { listZones } from './zones';

export async function exportZones(actor: Actor, fieldId: string): Promise<{ fieldName: string; zones: ExportZone[] } | null> {
	const field = await fields.get(actor, fieldId);
	if (!field) return null;
	const zones = await listZones(actor, fieldId);
	return {
		fieldName: field.name,
		zones: zones.map((z) => ({
			id: z.id,
			name: z.name,
			description: z.description,
			fieldName: field.name,
			areaM2: z.areaM2,
			source: z.source,
			season: z.season,
			targetRateLPerM2: z.targetRateLPerM2,
			geometry: z.geometry
		}))
	};
}

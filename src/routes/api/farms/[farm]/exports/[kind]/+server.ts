import { error } from '@sveltejs/kit';
import { requireMember } from '$lib/server/auth/guard';
import { parseMapQuery } from '$lib/server/map/dataset';
import { exportCells, exportFile, exportFormats, type ExportFormat, type ExportKind } from '$lib/server/exports';
import type { RequestHandler } from './$types';

const slug = (s: string) => s.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'field';

/** Cells or hotspots of a season (or two compared) as CSV, GeoJSON or a zipped shapefile. */
export const GET: RequestHandler = async (event) => {
	const actor = await requireMember(event, { api: true });
	const kind = event.params.kind;
	if (kind !== 'cells' && kind !== 'hotspots') error(404, `No export called “${kind}”: there are cells and hotspots.`);
	const format = event.url.searchParams.get('format') ?? 'csv';
	if (!exportFormats.includes(format as ExportFormat)) error(400, `format must be one of ${exportFormats.join(', ')}, got “${format}”.`);
	const params = new URLSearchParams(event.url.searchParams);
	params.delete('format');
	params.delete('field');
	const query = parseMapQuery(params);
	if ('error' in query) error(400, query.error);
	if (query.dataset.kind === 'application') error(400, 'Exports are per season or per two seasons compared, not per application.');
	if (query.thresholdPercent !== null) error(400, 'Exports use the farm’s saved hotspot threshold; save the threshold first.');
	const fieldId = event.url.searchParams.get('field');
	if (fieldId !== null && !/^[0-9a-f-]{36}$/i.test(fieldId)) error(400, `field must be a field id, got “${fieldId}”.`);
	const cells = await exportCells(actor, kind as ExportKind, query.dataset, fieldId);
	if (!cells) error(404, 'No such field on this farm.');
	if (cells.length === 0) error(404, `No ${kind} to export for this ${query.dataset.kind === 'compare' ? 'comparison' : 'season'}.`);
	const d = query.dataset;
	const seasons = d.kind === 'compare' ? `${d.earlier}-${d.later}` : String(d.season);
	const fieldPart = fieldId ? `-${slug(cells[0].fieldName)}` : '';
	const file = exportFile(cells, format as ExportFormat, `${actor.farm.slug}${fieldPart}-${seasons}-${kind}`, d);
	return new Response(typeof file.body === 'string' ? file.body : new Uint8Array(file.body), {
		headers: {
			'content-type': file.contentType,
			'content-disposition': `attachment; filename="${file.filename}"`,
			'cache-control': 'private, no-store'
		}
	});
};

import { error, fail, redirect } from '@sveltejs/kit';
import type { MultiPolygon, Polygon } from 'geojson';
import { requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import { formatIssue } from '$lib/ingest/issues';
import { parseBoundaryFile } from '$lib/ingest/boundaries';
import { BOUNDARY_FILE_MAX_BYTES, FORM_OVERHEAD_BYTES, readFormWithin } from '$lib/server/upload-limits';
import { createZones, previewZones, zoneFeatures } from '$lib/server/zones/zones';
import { parseTargetRate } from '$lib/server/zones/forms';
import type { Actions, PageServerLoad } from './$types';

const MAX_FILE_BYTES = BOUNDARY_FILE_MAX_BYTES;
/** The body is bounded before it is read whole; one zone file per import. */
const readForm = (request: Request) => readFormWithin(request, { maxBytes: BOUNDARY_FILE_MAX_BYTES + FORM_OVERHEAD_BYTES, maxFiles: 1, what: 'a zone file' });

export type ZonePreviewFeature = {
	index: number;
	properties: Record<string, string>;
	/** As cut to the field and clear of the field's zones (and of the features before it). */
	geometry: Polygon | MultiPolygon | null;
	areaM2: number | null;
	outsideM2: number;
	overlaps: { name: string; areaM2: number }[];
	problem: string | null;
};
export type ZonePreview = { fileName: string; format: string; features: ZonePreviewFeature[]; attributeNames: string[]; nameAttribute: string | null; warnings: string[]; epsg: number | null };

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'zones.edit');
	const field = await fields.get(actor, event.params.id);
	if (!field) error(404, 'No such field in this farm.');
	return { field: { id: field.id, name: field.name, boundary: field.boundary }, existing: await zoneFeatures(actor, field.id) };
};

type Read = { preview: ZonePreview } | { message: string; needsCrs: boolean };

async function readUpload(actor: Parameters<typeof previewZones>[0], fieldId: string, data: FormData): Promise<Read> {
	const file = data.get('file');
	if (!(file instanceof File) || !file.name) return { message: 'Choose a zone file first (GeoJSON, zipped shapefile, KML or GPX).', needsCrs: false };
	if (file.size === 0) return { message: `${file.name}: the file is empty.`, needsCrs: false };
	if (file.size > MAX_FILE_BYTES) return { message: `${file.name}: the file is ${(file.size / 1048576).toFixed(1)} MB; zone files up to 25 MB are accepted.`, needsCrs: false };
	const epsgText = String(data.get('epsg') ?? '').trim().replace(/^epsg:/i, '');
	const epsg = epsgText ? Number(epsgText) : undefined;
	if (epsg !== undefined && (!Number.isInteger(epsg) || epsg <= 0)) return { message: `“${epsgText}” is not an EPSG code; use a whole number such as 32614.`, needsCrs: true };
	// The same reader as field boundaries: formats, repairs and messages.
	const parsed = parseBoundaryFile(file.name, new Uint8Array(await file.arrayBuffer()), { epsg });
	if (!parsed.ok) return { message: formatIssue(parsed.error), needsCrs: parsed.needsCrs };
	const text = (v: unknown) => (v === null || v === undefined ? '' : typeof v === 'object' ? JSON.stringify(v) : String(v));
	const cut = await previewZones(actor, fieldId, parsed.features.map((f) => ({ name: `#${f.index}`, geometry: f.geometry })));
	if (!cut) error(404, 'No such field in this farm.');
	let next = 0;
	return {
		preview: {
			fileName: file.name,
			format: parsed.format,
			attributeNames: parsed.attributeNames,
			nameAttribute: parsed.nameAttribute,
			warnings: parsed.warnings,
			epsg: epsg ?? null,
			features: parsed.features.map((f, i) => {
				const problem = cut.problems.find((p) => p.index === i);
				const row = problem ? null : cut.rows[next++];
				return {
					index: f.index,
					properties: Object.fromEntries(parsed.attributeNames.map((k) => [k, text(f.properties[k])])),
					geometry: row ? row.geometry : null,
					areaM2: row ? row.areaM2 : null,
					outsideM2: row?.outsideM2 ?? 0,
					overlaps: (row?.overlaps ?? []).map((o) => ({ ...o, name: o.name.startsWith('#') ? `shape ${o.name.slice(1)} of this file` : o.name })),
					problem: problem ? `Shape ${f.index}: ${problem.message}` : null
				};
			})
		}
	};
}

export const actions: Actions = {
	preview: async (event) => {
		const actor = await requireRole(event, 'zones.edit');
		const limited = await readForm(event.request);
		if ('refused' in limited) return fail(limited.status, { stage: 'preview' as const, message: limited.refused, needsCrs: false });
		const read = await readUpload(actor, event.params.id, limited.form);
		if ('message' in read) return fail(400, { stage: 'preview' as const, ...read });
		return { stage: 'preview' as const, preview: read.preview };
	},
	save: async (event) => {
		const actor = await requireRole(event, 'zones.edit');
		const limited = await readForm(event.request);
		if ('refused' in limited) return fail(limited.status, { stage: 'save' as const, message: limited.refused, needsCrs: false });
		const data = limited.form;
		const read = await readUpload(actor, event.params.id, data);
		if ('message' in read) return fail(400, { stage: 'save' as const, ...read });
		const { preview } = read;
		const picked = new Set(data.getAll('pick').map(Number));
		const chosen = preview.features.filter((f) => picked.has(f.index) && f.geometry);
		if (chosen.length === 0) return fail(400, { stage: 'save' as const, preview, problems: {}, message: 'Tick at least one zone to save.' });
		const rates = chosen.map((f) => parseTargetRate(String(data.get(`rate-${f.index}`) ?? ''), actor.user.units));
		const badRate = rates.findIndex((r) => 'error' in r);
		if (badRate >= 0) {
			return fail(400, { stage: 'save' as const, preview, problems: { [chosen[badRate].index]: (rates[badRate] as { error: string }).error }, message: 'Nothing was saved: a target rate needs attention.' });
		}
		const result = await createZones(
			actor,
			event.params.id,
			chosen.map((f, i) => ({ name: String(data.get(`name-${f.index}`) ?? ''), geometry: f.geometry, targetRateLPerM2: (rates[i] as { value: number | null }).value })),
			{ via: 'imported', origin: { file: preview.fileName } }
		);
		if (!result) error(404, 'No such field in this farm.');
		if ('problems' in result) {
			const problems: Record<number, string> = {};
			for (const p of result.problems) if (p.index >= 0) problems[chosen[p.index].index] = p.message;
			return fail(422, { stage: 'save' as const, preview, problems, message: `Nothing was saved: ${result.problems.length === 1 ? 'one zone needs' : `${result.problems.length} zones need`} attention.` });
		}
		redirect(303, `/${actor.farm.slug}/fields/${event.params.id}/zones?made=${result.zones.length}`);
	}
};

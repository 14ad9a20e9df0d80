import { fail, redirect } from '@sveltejs/kit';
import type { MultiPolygon, Polygon } from 'geojson';
import { requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import { checkBoundary } from '$lib/geo/fields-boundary';
import { formatIssue } from '$lib/ingest/issues';
import { parseBoundaryFile } from '$lib/ingest/boundaries';
import { BOUNDARY_FILE_MAX_BYTES, FORM_OVERHEAD_BYTES, readFormWithin } from '$lib/server/upload-limits';
import type { Actions, PageServerLoad } from './$types';

const MAX_FILE_BYTES = BOUNDARY_FILE_MAX_BYTES;
/** The body is bounded before it is read whole; one boundary file per import. */
const readForm = (request: Request) => readFormWithin(request, { maxBytes: BOUNDARY_FILE_MAX_BYTES + FORM_OVERHEAD_BYTES, maxFiles: 1, what: 'a boundary file' });

export type PreviewFeature = {
	index: number;
	/** Attribute values as text, for the name picker and the list. */
	properties: Record<string, string>;
	geometry: Polygon | MultiPolygon;
	areaM2: number | null;
	/** Why this feature cannot be a field, when it cannot. */
	problem: string | null;
};
export type Preview = {
	fileName: string;
	format: string;
	features: PreviewFeature[];
	attributeNames: string[];
	nameAttribute: string | null;
	warnings: string[];
	epsg: number | null;
};

export const load: PageServerLoad = async (event) => {
	await requireRole(event, 'fields.edit');
	return {};
};

type Read = { preview: Preview } | { message: string; needsCrs: boolean; fileName: string };

async function readUpload(data: FormData): Promise<Read> {
	const file = data.get('file');
	if (!(file instanceof File) || file.size === 0 || !file.name) {
		return { message: 'Choose a boundary file first (GeoJSON, zipped shapefile, KML or GPX).', needsCrs: false, fileName: '' };
	}
	if (file.size > MAX_FILE_BYTES) {
		return { message: `${file.name}: the file is ${(file.size / 1048576).toFixed(1)} MB; boundary files up to 25 MB are accepted.`, needsCrs: false, fileName: file.name };
	}
	const epsgText = String(data.get('epsg') ?? '').trim().replace(/^epsg:/i, '');
	let epsg: number | undefined;
	if (epsgText) {
		epsg = Number(epsgText);
		if (!Number.isInteger(epsg) || epsg <= 0) {
			return { message: `“${epsgText}” is not an EPSG code; use a whole number such as 32614.`, needsCrs: true, fileName: file.name };
		}
	}
	const parsed = parseBoundaryFile(file.name, new Uint8Array(await file.arrayBuffer()), { epsg });
	if (!parsed.ok) return { message: formatIssue(parsed.error), needsCrs: parsed.needsCrs, fileName: file.name };
	const text = (v: unknown) => (v === null || v === undefined ? '' : typeof v === 'object' ? JSON.stringify(v) : String(v));
	return {
		preview: {
			fileName: file.name,
			format: parsed.format,
			attributeNames: parsed.attributeNames,
			nameAttribute: parsed.nameAttribute,
			warnings: parsed.warnings,
			epsg: epsg ?? null,
			features: parsed.features.map((f) => {
				const checked = checkBoundary(f.geometry);
				return {
					index: f.index,
					properties: Object.fromEntries(parsed.attributeNames.map((k) => [k, text(f.properties[k])])),
					geometry: 'error' in checked ? f.geometry : checked.boundary,
					areaM2: 'error' in checked ? null : checked.areaM2,
					problem: 'error' in checked ? `Feature ${f.index}: ${checked.error}.` : null
				};
			})
		}
	};
}

export const actions: Actions = {
	preview: async (event) => {
		await requireRole(event, 'fields.edit');
		const limited = await readForm(event.request);
		if ('refused' in limited) return fail(limited.status, { stage: 'preview' as const, message: limited.refused, needsCrs: false, fileName: '' });
		const read = await readUpload(limited.form);
		if ('message' in read) return fail(400, { stage: 'preview' as const, ...read });
		return { stage: 'preview' as const, preview: read.preview };
	},
	save: async (event) => {
		const actor = await requireRole(event, 'fields.edit');
		const limited = await readForm(event.request);
		if ('refused' in limited) return fail(limited.status, { stage: 'save' as const, message: limited.refused, needsCrs: false, fileName: '' });
		const data = limited.form;
		const read = await readUpload(data);
		if ('message' in read) return fail(400, { stage: 'save' as const, ...read });
		const { preview } = read;
		const cellSizeM = Number(data.get('cellSizeM') ?? 10);
		const picked = new Set(data.getAll('pick').map(Number));
		const chosen = preview.features.filter((f) => picked.has(f.index));
		if (chosen.length === 0) return fail(400, { stage: 'save' as const, preview, problems: {}, message: 'Tick at least one field to save.' });
		const result = await fields.createMany(
			actor,
			chosen.map((f) => ({ name: String(data.get(`name-${f.index}`) ?? ''), boundary: f.geometry, cellSizeM })),
			{ via: 'import', file: preview.fileName }
		);
		if ('problems' in result) {
			const problems: Record<number, string> = {};
			for (const p of result.problems) if (p.index >= 0) problems[chosen[p.index].index] = p.message;
			const general = result.problems.filter((p) => p.index < 0).map((p) => p.message);
			return fail(422, {
				stage: 'save' as const,
				preview,
				problems,
				message: general.join(' ') || `Nothing was saved: ${result.problems.length === 1 ? 'one field needs' : `${result.problems.length} fields need`} attention.`
			});
		}
		redirect(303, `/${actor.farm.slug}/fields?imported=${result.ids.length}`);
	}
};

// As-applied logs as GeoJSON Point features (RFC 7946: WGS84 [lng, lat]); the same mapping as
// for CSV applies to the feature properties.
import type { Feature, FeatureCollection, Geometry } from 'geojson';
import { IngestError, type IngestIssue } from './issues';
import type { ColumnMapping, Crs } from './mapping';
import { planRows, type Cell, type ReadLogOptions, type ReadLogResult } from './rows';
import { decodeBytes } from './text';
import { PREVIEW_ROWS } from './csv';

export type PointTable = {
	attributeNames: string[];
	/** Feature count. */
	count: number;
	/** Attribute values of feature i (0-based), in attributeNames order. */
	cells: (i: number) => Cell[];
	/** Point of feature i in the file's coordinates, or null when it has none. */
	point: (i: number) => [number, number] | null;
	/** CRS the file itself names (a shapefile's .prj, a legacy GeoJSON "crs" member). */
	crs: Crs | null;
	warnings: IngestIssue[];
};

/** Property names in order of first appearance. */
export function attributeNamesOf(props: (Record<string, unknown> | null | undefined)[]): string[] {
	const seen = new Set<string>();
	for (const p of props) if (p) for (const k of Object.keys(p)) seen.add(k);
	return [...seen];
}

export function pointOf(geometry: Geometry | null | undefined): [number, number] | null {
	if (!geometry) return null;
	if (geometry.type === 'Point') return positionOf(geometry.coordinates);
	if (geometry.type === 'MultiPoint' && Array.isArray(geometry.coordinates) && geometry.coordinates.length === 1)
		return positionOf(geometry.coordinates[0]);
	return null;
}

/** A position only when the file really holds two numbers there (JSON from elsewhere may not). */
function positionOf(p: unknown): [number, number] | null {
	return Array.isArray(p) && typeof p[0] === 'number' && typeof p[1] === 'number' ? [p[0], p[1]] : null;
}

/** Why a point geometry has no usable position, or null when it has one. */
function badPointReason(geometry: Geometry): string | null {
	if (geometry.type !== 'Point' && geometry.type !== 'MultiPoint') return null;
	if (pointOf(geometry)) return null;
	if (geometry.type === 'MultiPoint' && Array.isArray(geometry.coordinates) && geometry.coordinates.length !== 1)
		return `is a MultiPoint of ${geometry.coordinates.length} points; an as-applied log holds one point per feature`;
	return `is a ${geometry.type} whose coordinates are not two numbers`;
}

/** Reads GeoJSON text into a table of point features; throws IngestError when it is not one. */
export function geojsonPointTable(file: string, bytes: Uint8Array): PointTable {
	const { text } = decodeBytes(bytes);
	if (!text.trim()) throw new IngestError(file, 'is empty');
	let json: unknown;
	try {
		json = JSON.parse(text);
	} catch (err) {
		throw new IngestError(file, `is not valid JSON (${err instanceof Error ? err.message : err})`);
	}
	if (json === null || typeof json !== 'object' || Array.isArray(json))
		throw new IngestError(file, 'is not a GeoJSON FeatureCollection or Feature');
	const obj = json as Partial<FeatureCollection> & Partial<Feature> & { crs?: { properties?: { name?: string } } };
	const features: Feature[] =
		obj.type === 'FeatureCollection' && Array.isArray(obj.features)
			? obj.features
			: obj.type === 'Feature'
				? [obj as Feature]
				: [];
	if (!features.length)
		throw new IngestError(file, obj.type === 'FeatureCollection' ? 'holds no features' : 'is not a GeoJSON FeatureCollection or Feature');
	const warnings: IngestIssue[] = [];
	let crs: Crs | null = null;
	const crsName = obj.crs?.properties?.name;
	const epsg = crsName ? /EPSG:{1,2}(\d+)/i.exec(crsName) : null;
	if (epsg && epsg[1] !== '4326' && !/CRS84/i.test(crsName!)) {
		crs = Number(epsg[1]);
		warnings.push({ file, row: null, column: null, message: `names coordinate system EPSG:${crs} (an old GeoJSON "crs" member); positions were reprojected from it` });
	}
	const badPoint = features.findIndex((f) => f?.geometry && badPointReason(f.geometry));
	if (badPoint >= 0) throw new IngestError(file, `feature ${badPoint + 1} ${badPointReason(features[badPoint].geometry!)}`, { row: badPoint + 1 });
	const nonPoint = features.findIndex((f) => f?.geometry && !pointOf(f.geometry));
	if (nonPoint >= 0)
		throw new IngestError(file, `feature ${nonPoint + 1} is a ${typeName(features[nonPoint].geometry)}; an as-applied log holds points`, { row: nonPoint + 1 });
	const props = features.map((f) => f?.properties ?? {});
	const attributeNames = attributeNamesOf(props);
	return {
		attributeNames,
		count: features.length,
		cells: (i) => attributeNames.map((k) => props[i][k] as Cell),
		point: (i) => pointOf(features[i]?.geometry),
		crs,
		warnings
	};
}

function typeName(geometry: unknown): string {
	const type = (geometry as { type?: unknown })?.type;
	return typeof type === 'string' ? type.slice(0, 40) : 'geometry without a type';
}

/** Values shown in the mapping preview: the first rows as strings. */
export function previewOf(table: PointTable): string[][] {
	const out: string[][] = [];
	for (let i = 0; i < Math.min(PREVIEW_ROWS, table.count); i++)
		out.push(table.cells(i).map((c) => (c === null || c === undefined ? '' : String(c))));
	return out;
}

/** Converts a point table with a mapping. Position comes from the geometry unless the mapping
 * names coordinate attributes. */
export function readPointTable(file: string, table: PointTable, mapping: ColumnMapping, opts: ReadLogOptions): ReadLogResult {
	let m = mapping;
	if (m.position?.kind === 'geometry' && m.position.crs == null && table.crs != null)
		m = { ...m, position: { kind: 'geometry', crs: table.crs } };
	const planned = planRows(file, table.attributeNames, m, opts);
	if (!('plan' in planned)) return { fixes: null, extras: {}, warnings: table.warnings, errors: planned.errors };
	const plan = planned.plan;
	const usesGeometry = m.position?.kind === 'geometry';
	for (let i = 0; i < table.count; i++) plan.addRow(table.cells(i), i + 1, usesGeometry ? table.point(i) : null);
	const result = plan.finish();
	return { ...result, warnings: [...table.warnings, ...result.warnings] };
}

export function readGeojsonLog(file: string, bytes: Uint8Array, mapping: ColumnMapping, opts: ReadLogOptions): ReadLogResult {
	return readPointTable(file, geojsonPointTable(file, bytes), mapping, opts);
}

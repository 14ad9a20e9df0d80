// Field boundaries from GeoJSON, zipped shapefiles, KML and GPX, as WGS84 polygons ready to
// preview. Rings are closed and cleaned; rings that cross themselves are split when that is
// safe, otherwise the file is refused naming the feature, ring and vertex.
import { gpx as gpxToGeojson, kml as kmlToGeojson } from '@tmcw/togeojson';
import { booleanPointInPolygon, rewind, unkinkPolygon } from '@turf/turf';
import { DOMParser } from '@xmldom/xmldom';
import type { Feature, Geometry, MultiPolygon, Polygon, Position } from 'geojson';
import { parseDbf, parseShp } from 'shpjs';
import { isPlausibleDegrees, makeToWgs84, type ToWgs84 } from './crs';
import { IngestError, toIssue, type IngestIssue } from './issues';
import { cleanRing, findCrossings, pointInRing, signedArea2 } from './rings';
import { dbfCodePage, dbfHeaderProblem, shapefileParts } from './shapefile-points';
import { decodeBytes } from './text';
import { looksLikeZip, unzipSafe } from './zip';

export type BoundaryFeature = {
	/** 1-based position in the file, for messages. */
	index: number;
	/** Value of the suggested name attribute, when there is one. */
	name: string | null;
	properties: Record<string, unknown>;
	geometry: Polygon | MultiPolygon;
};

export type BoundaryFormat = 'geojson' | 'shapefile' | 'kml' | 'gpx';

export type BoundaryResult =
	| {
			ok: true;
			format: BoundaryFormat;
			features: BoundaryFeature[];
			attributeNames: string[];
			/** The attribute that looks like the field name; the user may pick another. */
			nameAttribute: string | null;
			warnings: string[];
	  }
	| {
			ok: false;
			/** True when the coordinates are projected and the file does not say how: ask for an
			 * EPSG code and call again with opts.epsg. */
			needsCrs: boolean;
			error: IngestIssue;
	  };

export type BoundaryOptions = { epsg?: number };

/** GPX tracks whose ends are this close (metres) count as closed outlines. */
export const GPX_CLOSE_M = 10;

const KML_STYLE_KEYS = new Set(['styleUrl', 'styleHash', 'styleMapHash', 'stroke', 'stroke-opacity', 'stroke-width', 'fill', 'fill-opacity', 'visibility', 'icon', 'icon-opacity', 'icon-scale', 'icon-color', 'label-scale', 'label-color', 'label-opacity', 'icon-offset', 'icon-offset-units', 'icon-heading', 'timespan', 'timestamp', 'coordinateProperties', '_gpxType']);

type Raw = { properties: Record<string, unknown>; geometry: Geometry | null };
type Parsed = { format: BoundaryFormat; raw: Raw[]; warnings: string[]; toWgs84?: ToWgs84 | null; crsKnown: boolean; hiddenKeys?: Set<string> };

export function boundaryFormatOf(fileName: string, bytes: Uint8Array): BoundaryFormat | null {
	const lower = fileName.toLowerCase();
	if (lower.endsWith('.zip') || lower.endsWith('.kmz') || looksLikeZip(bytes)) return 'shapefile';
	if (lower.endsWith('.kml')) return 'kml';
	if (lower.endsWith('.gpx')) return 'gpx';
	if (lower.endsWith('.geojson') || lower.endsWith('.json')) return 'geojson';
	const head = new TextDecoder().decode(bytes.subarray(0, 4096)).replace(/^\ufeff/, '').trimStart();
	if (head.startsWith('{')) return 'geojson';
	if (/<kml[\s>]/.test(head)) return 'kml';
	if (/<gpx[\s>]/.test(head)) return 'gpx';
	return null;
}

/** Reads boundaries. Never throws: every problem comes back as { ok: false, error }. */
export function parseBoundaryFile(fileName: string, bytes: Uint8Array, opts: BoundaryOptions = {}): BoundaryResult {
	try {
		return parseOrThrow(fileName, bytes, opts);
	} catch (err) {
		return { ok: false, needsCrs: false, error: toIssue(fileName, err) };
	}
}

function parseOrThrow(file: string, bytes: Uint8Array, opts: BoundaryOptions): BoundaryResult {
	if (!bytes.length) throw new IngestError(file, 'is empty');
	const format = boundaryFormatOf(file, bytes);
	if (!format) throw new IngestError(file, 'is not a boundary file Patchbook reads (GeoJSON, zipped shapefile, KML or GPX)');
	let parsed: Parsed;
	if (format === 'shapefile') {
		const entries = unzipSafe(file, bytes);
		const kml = [...entries.keys()].find((k) => k.toLowerCase().endsWith('.kml'));
		const hasShp = [...entries.keys()].some((k) => k.toLowerCase().endsWith('.shp'));
		parsed = kml && !hasShp ? readXml(file, 'kml', entries.get(kml)!) : readShapefile(file, entries, opts);
	} else if (format === 'geojson') parsed = readGeojson(file, bytes, opts);
	else parsed = readXml(file, format, bytes);

	// Files from elsewhere can hold anything where coordinates belong; refuse those naming the
	// feature before any geometry code sees them.
	let vertices = 0;
	parsed.raw.forEach((f, i) => {
		const problem = shapeProblem(f.geometry, 0);
		if (problem) throw new IngestError(file, `${labelOf(propsOf(f.properties), i + 1)}: ${problem}`, { row: i + 1 });
		for (const rings of polygonsOf(f.geometry) ?? []) {
			const n = rings.reduce((sum, ring) => sum + ring.length, 0);
			vertices += n;
			if (n > MAX_POLYGON_VERTICES)
				throw new IngestError(file, `${labelOf(propsOf(f.properties), i + 1)}: a polygon has ${n} points; at most ${MAX_POLYGON_VERTICES} are read per polygon (simplify it first)`, { row: i + 1 });
		}
		if (vertices > MAX_FILE_VERTICES) throw new IngestError(file, `holds more than ${MAX_FILE_VERTICES} boundary points; at most that many are read per file (split or simplify it)`);
	});
	const warnings = [...parsed.warnings];
	let toWgs84 = parsed.toWgs84 ?? null;
	if (!parsed.crsKnown) {
		const sample = firstOutOfDegrees(parsed.raw);
		if (sample) {
			if (!opts.epsg)
				return {
					ok: false,
					needsCrs: true,
					error: { file, row: null, column: null, message: `coordinates such as ${sample[0]}, ${sample[1]} are not degrees and the file does not say which coordinate system they are in: choose an EPSG code (for example 32614 for WGS 84 / UTM zone 14N)` }
				};
		} else if (!opts.epsg && format === 'shapefile') warnings.push('the shapefile has no .prj; its coordinates look like degrees and were read as WGS84');
		if (opts.epsg) {
			try {
				toWgs84 = makeToWgs84(opts.epsg);
			} catch (err) {
				throw new IngestError(file, err instanceof Error ? err.message : String(err));
			}
			warnings.push(`coordinates were reprojected from EPSG:${opts.epsg}`);
		}
	}

	const features: BoundaryFeature[] = [];
	const skipped: Record<string, number> = {};
	parsed.raw.forEach((f, i) => {
		const polygons = polygonsOf(f.geometry);
		if (!polygons) {
			const type = f.geometry?.type ?? 'no geometry';
			skipped[type] = (skipped[type] ?? 0) + 1;
			return;
		}
		const projected = toWgs84 ? polygons.map((rings) => rings.map((ring) => ring.map((p) => projectPoint(file, i + 1, toWgs84!, p)))) : polygons;
		const label = labelOf(f.properties, i + 1);
		const geometry = repairPolygons(file, label, projected, warnings);
		features.push({ index: i + 1, name: null, properties: f.properties, geometry });
	});
	const skippedText = Object.entries(skipped).map(([t, n]) => `${n} ${t}`).join(', ');
	if (!features.length) {
		const what = format === 'kml' ? 'KML' : format === 'gpx' ? 'GPX' : format === 'shapefile' ? 'shapefile' : 'GeoJSON';
		throw new IngestError(file, `this ${what} file holds no polygons${skippedText ? ` (only ${skippedText})` : ''}${format === 'gpx' ? `; a track or route counts as a boundary only when it ends within ${GPX_CLOSE_M} m of its start` : ''}`);
	}
	if (skippedText) warnings.push(`left out features that are not polygons: ${skippedText}`);
	const attributeNames = [...new Set(features.flatMap((f) => Object.keys(f.properties)))].filter((k) => !parsed.hiddenKeys?.has(k));
	const nameAttribute = suggestNameAttribute(attributeNames, features);
	if (nameAttribute) for (const f of features) f.name = f.properties[nameAttribute] == null ? null : String(f.properties[nameAttribute]);
	return { ok: true, format, features, attributeNames, nameAttribute, warnings };
}

function projectPoint(file: string, feature: number, toWgs84: ToWgs84, p: Position): Position {
	const q = toWgs84([p[0], p[1]]);
	if (!isPlausibleDegrees(q[0], q[1]))
		throw new IngestError(file, `feature ${feature}: point ${p[0]}, ${p[1]} does not fall on the earth in the chosen coordinate system`, { row: feature });
	return q;
}

function firstOutOfDegrees(raw: Raw[]): Position | null {
	for (const f of raw) {
		for (const rings of polygonsOf(f.geometry) ?? []) for (const ring of rings) for (const p of ring) if (!isPlausibleDegrees(p[0], p[1])) return p;
	}
	return null;
}

/** Checking a ring for crossings costs up to the square of its points (many points in a
 * straight north-south line defeat the sweep), so outlines are bounded. Real boundaries, even
 * walked with GPS at one point a second, hold a few thousand (common practice, no source);
 * at these bounds the worst case reads in about 2 s on the test machine. */
export const MAX_POLYGON_VERTICES = 20_000;
export const MAX_FILE_VERTICES = 200_000;

/** Deepest GeometryCollection nesting read; real files do not nest them at all. */
const MAX_COLLECTION_DEPTH = 8;

/** Why a polygon-bearing geometry is malformed (coordinates not nested lists of number pairs, a
 * polygon without rings, collections nested too deep), or null. Other geometry types are left
 * for the caller to skip. */
function shapeProblem(g: unknown, depth: number): string | null {
	if (g === null || g === undefined) return null;
	if (typeof g !== 'object' || Array.isArray(g)) return 'the geometry is not an object';
	const { type, coordinates, geometries } = g as { type?: unknown; coordinates?: unknown; geometries?: unknown };
	const isPosition = (p: unknown) => Array.isArray(p) && p.length >= 2 && Number.isFinite(p[0]) && Number.isFinite(p[1]);
	const polygonProblem = (rings: unknown): string | null => {
		if (!Array.isArray(rings) || rings.length === 0) return 'a polygon has no rings';
		for (let r = 0; r < rings.length; r++) {
			if (!Array.isArray(rings[r])) return `ring ${r} is not a list of points`;
			if (!rings[r].every(isPosition)) return `ring ${r} has a point that is not a pair of numbers`;
		}
		return null;
	};
	if (type === 'Polygon') return polygonProblem(coordinates);
	if (type === 'MultiPolygon') {
		if (!Array.isArray(coordinates)) return 'the MultiPolygon coordinates are not a list of polygons';
		for (let k = 0; k < coordinates.length; k++) {
			const problem = polygonProblem(coordinates[k]);
			if (problem) return `part ${k + 1}: ${problem}`;
		}
		return null;
	}
	if (type === 'GeometryCollection') {
		if (!Array.isArray(geometries)) return 'the GeometryCollection has no list of geometries';
		if (depth >= MAX_COLLECTION_DEPTH) return `GeometryCollections are nested more than ${MAX_COLLECTION_DEPTH} deep`;
		for (const part of geometries) {
			const problem = shapeProblem(part, depth + 1);
			if (problem) return problem;
		}
	}
	return null;
}

const propsOf = (p: unknown): Record<string, unknown> => (p && typeof p === 'object' && !Array.isArray(p) ? (p as Record<string, unknown>) : {});

/** Polygon and MultiPolygon as lists of polygons; collections of polygons too; else null. */
function polygonsOf(g: Geometry | null): Position[][][] | null {
	if (!g) return null;
	if (g.type === 'Polygon') return [g.coordinates];
	if (g.type === 'MultiPolygon') return g.coordinates;
	if (g.type === 'GeometryCollection') {
		const parts = g.geometries.map(polygonsOf).filter((p): p is Position[][][] => !!p);
		return parts.length ? parts.flat() : null;
	}
	return null;
}

function labelOf(props: Record<string, unknown>, index: number): string {
	const name = props.name ?? props.Name ?? props.NAME;
	return name != null && name !== '' ? `feature ${index} ('${name}')` : `feature ${index}`;
}

/** Cleans every ring, then checks crossings; a single outer ring that crosses itself (no holes)
 * is split into its loops with turf's unkinkPolygon when the loops do not overlap. */
function repairPolygons(file: string, label: string, polygons: Position[][][], warnings: string[]): Polygon | MultiPolygon {
	const out: Position[][][] = [];
	polygons.forEach((rings, part) => {
		const where = polygons.length > 1 ? `${label}, part ${part + 1}` : label;
		const cleaned: Position[][] = [];
		rings.forEach((ring, r) => {
			if (!Array.isArray(ring) || ring.some((p) => !Array.isArray(p) || !Number.isFinite(p[0]) || !Number.isFinite(p[1])))
				throw new IngestError(file, `${where}: ring ${r} has a point that is not a pair of numbers`);
			const c = cleanRing(ring);
			if (c.wasOpen) warnings.push(`${where}: ring ${r} was not closed; closed it`);
			if (c.repeats) warnings.push(`${where}: ring ${r} repeated ${c.repeats} point(s); removed them`);
			if (c.spikes.length) warnings.push(`${where}: ring ${r} doubled back on itself at vertex ${c.spikes.join(', ')}; removed that spike`);
			if (c.ring.length < 4) {
				if (r === 0) throw new IngestError(file, `${where}: ring ${r} has fewer than 3 distinct points`);
				warnings.push(`${where}: hole ring ${r} has fewer than 3 distinct points; dropped it`);
				return;
			}
			cleaned.push(c.ring);
		});
		const crossings = findCrossings(cleaned);
		if (!crossings.length) {
			for (let h = 1; h < cleaned.length; h++) {
				if (!pointInRing(cleaned[h][0], cleaned[0]) && !pointInRing(cleaned[h][1], cleaned[0]))
					throw new IngestError(file, `${where}: hole ring ${h} lies outside the outer ring 0`);
			}
			out.push(cleaned);
			return;
		}
		const x = crossings[0];
		const detail = x.ring === x.otherRing
			? `ring ${x.ring} crosses itself: the edge from vertex ${x.vertex} meets the edge from vertex ${x.otherVertex}`
			: `ring ${x.ring} (edge from vertex ${x.vertex}) crosses ring ${x.otherRing} (edge from vertex ${x.otherVertex})`;
		const split = cleaned.length === 1 && crossings.every((c) => c.ring === 0 && c.otherRing === 0) ? unkinkSafely(cleaned[0]) : null;
		if (!split) throw new IngestError(file, `${where}: ${detail}; the outline is invalid and could not be repaired safely`);
		warnings.push(`${where}: ${detail}; split it into ${split.length} polygons where it crosses`);
		out.push(...split);
	});
	const geometry: Polygon | MultiPolygon = out.length === 1 ? { type: 'Polygon', coordinates: out[0] } : { type: 'MultiPolygon', coordinates: out };
	// RFC 7946 section 3.1.6: outer rings counter-clockwise, holes clockwise.
	return rewind(geometry, { mutate: true }) as Polygon | MultiPolygon;
}

/** The loops of a self-crossing ring, if they are valid and do not overlap one another. */
function unkinkSafely(ring: Position[]): Position[][][] | null {
	let pieces: Position[][];
	try {
		pieces = unkinkPolygon({ type: 'Polygon', coordinates: [ring] }).features.map((f) => f.geometry.coordinates[0]);
	} catch {
		return null;
	}
	const areaOf = (r: Position[]) => Math.abs(signedArea2(r)) / 2;
	const total = pieces.reduce((s, p) => s + areaOf(p), 0);
	pieces = pieces.filter((p) => p.length >= 4 && areaOf(p) > 1e-9 * total);
	if (pieces.length < 2) return null;
	for (const p of pieces) if (findCrossings([p], 1).length) return null;
	for (let a = 0; a < pieces.length; a++)
		for (let b = 0; b < pieces.length; b++) {
			if (a === b) continue;
			const other = { type: 'Polygon' as const, coordinates: [pieces[b]] };
			if (pieces[a].some((p) => booleanPointInPolygon(p, other, { ignoreBoundary: true }))) return null;
		}
	return pieces.map((p) => [p]);
}

function suggestNameAttribute(names: string[], features: BoundaryFeature[]): string | null {
	const score = (k: string) => {
		const values = features.map((f) => f.properties[k]).filter((v) => typeof v === 'string' && v.trim() !== '') as string[];
		if (!values.length) return -1;
		const distinct = new Set(values).size / features.length;
		const named = /^(name|field ?name|field|title|label)$/i.test(k.replace(/_/g, ' ')) ? 2 : /name|field|title|label/i.test(k) ? 1 : 0;
		return named * 2 + distinct;
	};
	let best: string | null = null;
	let bestScore = 0;
	for (const k of names) {
		const s = score(k);
		if (s > bestScore) (best = k), (bestScore = s);
	}
	return best;
}

function readGeojson(file: string, bytes: Uint8Array, opts: BoundaryOptions): Parsed {
	const { text } = decodeBytes(bytes);
	let json: Record<string, unknown>;
	try {
		json = JSON.parse(text);
	} catch (err) {
		throw new IngestError(file, `is not valid JSON (${err instanceof Error ? err.message : err})`);
	}
	const raw: Raw[] = [];
	if (json?.type === 'FeatureCollection' && Array.isArray(json.features))
		for (const f of json.features as Feature[]) raw.push({ properties: propsOf(f?.properties), geometry: f?.geometry ?? null });
	else if (json?.type === 'Feature') raw.push({ properties: propsOf(json.properties), geometry: (json.geometry as Geometry) ?? null });
	else if (typeof json?.type === 'string' && 'coordinates' in json || json?.type === 'GeometryCollection') raw.push({ properties: {}, geometry: json as unknown as Geometry });
	else throw new IngestError(file, 'is JSON but not GeoJSON (no FeatureCollection, Feature or geometry)');
	const warnings: string[] = [];
	// RFC 7946 dropped "crs"; older files still name EPSG codes with it.
	const crsName = (json.crs as { properties?: { name?: string } } | undefined)?.properties?.name;
	const epsg = crsName && !/CRS84|EPSG:{1,2}4326$/i.test(crsName) ? /EPSG:{1,2}(\d+)/i.exec(crsName) : null;
	if (epsg && !opts.epsg) {
		warnings.push(`the file names EPSG:${epsg[1]} in an old "crs" member; coordinates were reprojected from it`);
		try {
			return { format: 'geojson', raw, warnings, toWgs84: makeToWgs84(Number(epsg[1])), crsKnown: true };
		} catch (err) {
			throw new IngestError(file, err instanceof Error ? err.message : String(err));
		}
	}
	return { format: 'geojson', raw, warnings, crsKnown: false };
}

function readShapefile(file: string, entries: Map<string, Uint8Array>, opts: BoundaryOptions): Parsed {
	const parts = shapefileParts(file, entries);
	let geometries: (Geometry | null)[];
	let records: Record<string, unknown>[];
	try {
		geometries = parseShp(parts.shp);
	} catch (err) {
		throw new IngestError(file, `'${parts.layer}.shp' could not be read (${err instanceof Error ? err.message : err})`);
	}
	const dbfProblem = dbfHeaderProblem(parts.dbf);
	if (dbfProblem) throw new IngestError(file, `'${parts.layer}.dbf' ${dbfProblem}`);
	try {
		records = parseDbf(parts.dbf, dbfCodePage(parts.dbf, parts.cpg));
	} catch (err) {
		throw new IngestError(file, `'${parts.layer}.dbf' could not be read (${err instanceof Error ? err.message : err})`);
	}
	const warnings = [...parts.warnings];
	if (records.length !== geometries.length)
		throw new IngestError(file, `'${parts.layer}.shp' has ${geometries.length} records but '${parts.layer}.dbf' has ${records.length}`);
	const raw = geometries.map((geometry, i) => ({ geometry, properties: records[i] ?? {} }));
	if (parts.prj && !opts.epsg) {
		try {
			return { format: 'shapefile', raw, warnings, toWgs84: makeToWgs84(parts.prj), crsKnown: true };
		} catch (err) {
			throw new IngestError(file, `'${parts.layer}.prj' ${err instanceof Error ? err.message : err}`);
		}
	}
	if (parts.prj && opts.epsg) warnings.push(`the chosen EPSG:${opts.epsg} was used instead of '${parts.layer}.prj'`);
	return { format: 'shapefile', raw, warnings, crsKnown: false };
}

function readXml(file: string, format: 'kml' | 'gpx', bytes: Uint8Array): Parsed {
	const { text } = decodeBytes(bytes);
	let doc;
	let problem: string | null = null;
	try {
		// Errors become exceptions (with the parser's own message) instead of console noise.
		const onError = (level: string, message: string) => {
			if (level === 'warning') return;
			problem ??= message.trim();
			throw new Error(message);
		};
		doc = new DOMParser({ onError }).parseFromString(text, 'text/xml');
	} catch (err) {
		throw new IngestError(file, `is not well-formed XML (${problem ?? (err instanceof Error ? err.message.split('\n')[0] : err)})`);
	}
	const root = doc.documentElement?.nodeName.toLowerCase().replace(/^.*:/, '');
	if (root !== format) throw new IngestError(file, `is not a ${format.toUpperCase()} document (its root element is <${root ?? 'none'}>)`);
	const warnings: string[] = [];
	if (format === 'kml') {
		const fc = kmlToGeojson(doc);
		return { format, raw: fc.features.map((f) => ({ properties: f.properties ?? {}, geometry: f.geometry })), warnings, crsKnown: true, hiddenKeys: KML_STYLE_KEYS };
	}
	const fc = gpxToGeojson(doc);
	const raw: Raw[] = fc.features.map((f) => {
		const lines = f.geometry?.type === 'LineString' ? [f.geometry.coordinates] : f.geometry?.type === 'MultiLineString' ? f.geometry.coordinates : null;
		if (!lines) return { properties: f.properties ?? {}, geometry: f.geometry };
		const closed = lines.filter((l) => l.length >= 3 && metresBetween(l[0], l[l.length - 1]) <= GPX_CLOSE_M);
		if (!closed.length) return { properties: f.properties ?? {}, geometry: f.geometry };
		if (closed.length < lines.length) warnings.push(`${labelOf(f.properties ?? {}, fc.features.indexOf(f) + 1)}: ${lines.length - closed.length} open track segment(s) left out`);
		const rings = closed.map((l) => {
			const ring = l.map((p) => [p[0], p[1]]);
			const [first, last] = [ring[0], ring[ring.length - 1]];
			if (first[0] !== last[0] || first[1] !== last[1]) ring.push([first[0], first[1]]);
			return ring;
		});
		return { properties: f.properties ?? {}, geometry: { type: 'MultiPolygon', coordinates: rings.map((r) => [r]) } as MultiPolygon };
	});
	return { format, raw, warnings, crsKnown: true, hiddenKeys: KML_STYLE_KEYS };
}

/** Equirectangular distance; only used to decide whether a GPX track closes on itself. */
function metresBetween(a: Position, b: Position): number {
	const k = Math.cos((((a[1] + b[1]) / 2) * Math.PI) / 180);
	return Math.hypot((a[0] - b[0]) * k, a[1] - b[1]) * 111_195;
}

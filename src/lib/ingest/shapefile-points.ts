// As-applied logs as zipped point shapefiles. The zip is checked by zip.ts first; shpjs reads
// the .shp records and the .dbf attributes. A dBASE text field holds at most 254 characters,
// so long nozzle strings arrive split over several fields, joined in mapping order.
import { parseDbf, parseShp } from 'shpjs';
import { IngestError, type IngestIssue } from './issues';
import type { ColumnMapping } from './mapping';
import { attributeNamesOf, pointOf, readPointTable, type PointTable } from './geojson-points';
import type { Cell, ReadLogOptions, ReadLogResult } from './rows';
import { detectEncoding } from './text';
import { unzipSafe, type ZipLimits } from './zip';

export type ShapefileParts = { layer: string; shp: Uint8Array; dbf: Uint8Array; prj: string | null; cpg: string | null; warnings: string[] };

/** Finds one layer's .shp, .dbf, .prj and .cpg in an unzipped archive. */
export function shapefileParts(file: string, entries: Map<string, Uint8Array>): ShapefileParts {
	const byExt = (ext: string) =>
		[...entries.keys()].filter((k) => !k.includes('__MACOSX') && k.toLowerCase().endsWith(ext));
	const shps = byExt('.shp');
	const dbfs = byExt('.dbf');
	if (!shps.length && !dbfs.length) throw new IngestError(file, 'holds no shapefile (no .shp and no .dbf inside the zip)');
	if (!shps.length) throw new IngestError(file, 'holds a .dbf but no .shp: the geometry file is missing from the zip');
	const warnings: string[] = [];
	const shpName = shps[0];
	const layer = shpName.slice(0, -4);
	if (shps.length > 1) warnings.push(`holds ${shps.length} shapefiles; read '${shpName}' only`);
	const sibling = (ext: string) => [...entries.keys()].find((k) => k.toLowerCase() === (layer + ext).toLowerCase());
	const dbfName = sibling('.dbf');
	if (!dbfName) throw new IngestError(file, `holds '${shpName}' but no '${layer}.dbf': the attribute file is missing from the zip`);
	const prjName = sibling('.prj');
	const cpgName = sibling('.cpg');
	const text = (name: string | undefined) => (name ? new TextDecoder().decode(entries.get(name)!).trim() : null);
	return { layer, shp: entries.get(shpName)!, dbf: entries.get(dbfName)!, prj: text(prjName), cpg: text(cpgName), warnings };
}

/** dBASE text without a .cpg: UTF-8 if its records decode as such, else windows-1252. */
export function dbfCodePage(dbf: Uint8Array, cpg: string | null): string {
	if (cpg) return cpg;
	const headerLen = dbf.length >= 10 ? dbf[8] | (dbf[9] << 8) : 0;
	return detectEncoding(dbf.subarray(headerLen)).encoding;
}

/** Why a .dbf header cannot be right for the file's size, or null. shpjs loops over the record
 * count the header declares, so a damaged count (found by fuzzing: 33 million records in a
 * 258-byte file took 20 s) must be refused before it is parsed. dBASE header layout: record
 * count at byte 4, header length at 8, record length at 10 (little-endian). */
export function dbfHeaderProblem(dbf: Uint8Array): string | null {
	if (dbf.length < 32) return `is ${dbf.length} bytes, shorter than a dBASE header`;
	const view = new DataView(dbf.buffer, dbf.byteOffset, dbf.byteLength);
	const count = view.getUint32(4, true);
	const headerLen = view.getUint16(8, true);
	const recordLen = view.getUint16(10, true);
	if (headerLen < 33 || headerLen > dbf.length) return `has a damaged header (header length ${headerLen} in a file of ${dbf.length} bytes)`;
	if (recordLen < 1) return 'has a damaged header (record length 0)';
	if (headerLen + count * recordLen > dbf.length + 1)
		return `is damaged: its header declares ${count} records of ${recordLen} bytes, but the file holds ${dbf.length} bytes`;
	return null;
}

function readDbf(file: string, parts: ShapefileParts): Record<string, unknown>[] {
	const problem = dbfHeaderProblem(parts.dbf);
	if (problem) throw new IngestError(file, `'${parts.layer}.dbf' ${problem}`);
	try {
		return parseDbf(parts.dbf, dbfCodePage(parts.dbf, parts.cpg));
	} catch (err) {
		throw new IngestError(file, `'${parts.layer}.dbf' could not be read (${err instanceof Error ? err.message : err})`);
	}
}

function readShp(file: string, parts: ShapefileParts) {
	try {
		return parseShp(parts.shp);
	} catch (err) {
		throw new IngestError(file, `'${parts.layer}.shp' could not be read (${err instanceof Error ? err.message : err})`);
	}
}

/** dBASE dates arrive as local-time Date objects from parsedbf; keep them as the date written. */
function cellOf(v: unknown): Cell {
	if (v instanceof Date) {
		if (Number.isNaN(v.getTime())) return null;
		const p = (n: number) => String(n).padStart(2, '0');
		return `${v.getFullYear()}-${p(v.getMonth() + 1)}-${p(v.getDate())}`;
	}
	if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean') return v;
	return null;
}

export function shapefilePointTable(file: string, bytes: Uint8Array, limits?: Partial<ZipLimits>): PointTable {
	const parts = shapefileParts(file, unzipSafe(file, bytes, limits));
	const geometries = readShp(file, parts);
	const records = readDbf(file, parts);
	const warnings: IngestIssue[] = parts.warnings.map((message) => ({ file, row: null, column: null, message }));
	if (records.length !== geometries.length)
		throw new IngestError(file, `'${parts.layer}.shp' has ${geometries.length} records but '${parts.layer}.dbf' has ${records.length}`);
	const bad = geometries.findIndex((g) => g && !pointOf(g));
	if (bad >= 0)
		throw new IngestError(file, `record ${bad + 1} of '${parts.layer}.shp' is a ${geometries[bad]!.type}; an as-applied log holds points`, { row: bad + 1 });
	const attributeNames = attributeNamesOf(records);
	return {
		attributeNames,
		count: geometries.length,
		cells: (i) => attributeNames.map((k) => cellOf(records[i][k])),
		point: (i) => pointOf(geometries[i]),
		crs: parts.prj,
		warnings
	};
}

export function readShapefileLog(file: string, bytes: Uint8Array, mapping: ColumnMapping, opts: ReadLogOptions): ReadLogResult {
	return readPointTable(file, shapefilePointTable(file, bytes), mapping, opts);
}

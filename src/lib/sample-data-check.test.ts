// The invented demo farm (scripts/sample-data): deterministic, valid boundaries of the sizes the
// demo brief asks for, and logs the product's own readers accept with the manifest's mappings.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { booleanValid, featureCollection, intersect, kinks } from '@turf/turf';
import type { Feature, FeatureCollection, MultiPolygon, Polygon } from 'geojson';
import { describe, expect, test } from 'vitest';
import { committedFiles, fullLogs, makeLog, SAMPLE_DATA_DIR } from '../../scripts/sample-data/generate';
import { startMsOf } from '../../scripts/sample-data/simulate';
import { fieldNamed } from '../../scripts/sample-data/layout';
import { weedRaster, WEED_PIXEL_M } from '../../scripts/sample-data/weeds';
import { splitByField } from './compute/split-by-field';
import { areaM2 } from './geo/area';
import { parseBoundaryFile } from './ingest/boundaries';
import type { ColumnMapping } from './ingest/mapping';
import { readLog } from './ingest/log';

type Fields = FeatureCollection<Polygon | MultiPolygon, { name: string }>;
type ManifestLog = { file: string; day: string; uploadedBy: string; machine: string; tankMix: string; mapping: ColumnMapping; fields: string[]; farm?: string };
type Manifest = {
	password: string;
	users: { email: string; name: string; units: string }[];
	farms: {
		slug: string;
		name: string;
		boundaries: string;
		members: { email: string; role: string }[];
		grants: { email: string; fields: string[]; cropSharePercent: number }[];
		catalogue: {
			machines: { name: string; boomWidthM: number; nozzleCount: number; nozzleSpacingM: number; nozzlesPerSensor: number }[];
			products: { name: string; unit: string; pricePerUnit: number }[];
			tankMixes: { name: string; carrierRateLPerM2: number; products: { name: string; ratePerM2: number }[] }[];
		};
		logs: ManifestLog[];
	}[];
	samples: ManifestLog[];
};

const file = (path: string) => new Uint8Array(readFileSync(join(SAMPLE_DATA_DIR, path)));
const manifest: Manifest = JSON.parse(readFileSync(join(SAMPLE_DATA_DIR, 'demo/manifest.json'), 'utf8'));
const tallowgrass: Fields = JSON.parse(readFileSync(join(SAMPLE_DATA_DIR, 'demo/boundaries/tallowgrass.geojson'), 'utf8'));
const brennan: Fields = JSON.parse(readFileSync(join(SAMPLE_DATA_DIR, 'demo/boundaries/brennan-creek.geojson'), 'utf8'));

// Target areas from the demo brief (hectares, net of holes).
const TARGET_HA: Record<string, number> = {
	'North Flat': 180,
	Schoolhouse: 95,
	'Coyote Draw': 140,
	'Wetland Quarter': 160,
	'Home Place': 60,
	'Split Forty': 70,
	'Long Hill': 255,
	Railside: 75,
	'East Bench': 120,
	'Little Draw': 32
};

describe('generator', () => {
	test('the committed set on disk is what the generator makes, and two runs give the same bytes', () => {
		const a = committedFiles();
		const b = committedFiles();
		expect(Object.keys(a).sort()).toEqual(Object.keys(b).sort());
		for (const [path, data] of Object.entries(a)) {
			const bytes = typeof data === 'string' ? new TextEncoder().encode(data) : data;
			const again = b[path];
			expect(Buffer.compare(Buffer.from(bytes), Buffer.from(typeof again === 'string' ? new TextEncoder().encode(again) : again)), path).toBe(0);
			// Stale committed files would mean the README's command no longer makes them.
			expect(Buffer.compare(Buffer.from(bytes), Buffer.from(file(path))), `${path} is stale: run npm run sample-data`).toBe(0);
		}
	});

	test('one full log comes out byte for byte the same twice', () => {
		const spec = fullLogs().find((l) => l.format === 'shapefile')!;
		const a = makeLog(spec);
		const b = makeLog(spec);
		expect(a.fixes).toBeGreaterThan(10_000);
		expect(Buffer.compare(Buffer.from(a.bytes), Buffer.from(b.bytes))).toBe(0);
	});

	test('logs start in the local morning on their own day in America/Los_Angeles (IANA tz database via Intl)', () => {
		const fmt = new Intl.DateTimeFormat('en-CA', { timeZone: 'America/Los_Angeles', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', hourCycle: 'h23' });
		for (const spec of fullLogs()) {
			const parts = Object.fromEntries(fmt.formatToParts(new Date(startMsOf(spec))).map((p) => [p.type, p.value]));
			expect(`${parts.year}-${parts.month}-${parts.day}`).toBe(spec.day);
			expect(Number(parts.hour)).toBeGreaterThanOrEqual(6);
			expect(Number(parts.hour)).toBeLessThan(10);
		}
	});
});

describe('boundaries', () => {
	const all = [...tallowgrass.features, ...brennan.features];

	test('Tallowgrass has exactly the ten fields of the brief, Brennan Creek two', () => {
		expect(tallowgrass.features.map((f) => f.properties.name).sort()).toEqual(Object.keys(TARGET_HA).sort());
		expect(brennan.features.map((f) => f.properties.name).sort()).toEqual(['Creek Bottom', 'Upper Bench']);
	});

	test.each(all.map((f) => [f.properties.name, f] as const))('%s is a valid polygon without self-intersections (turf)', (_, f) => {
		expect(booleanValid(f)).toBe(true);
		expect(kinks(f as Feature<Polygon | MultiPolygon>).features).toHaveLength(0);
	});

	test('no two fields overlap (turf intersect)', () => {
		for (let i = 0; i < all.length; i++)
			for (let j = i + 1; j < all.length; j++) {
				const overlap = intersect(featureCollection([all[i], all[j]]));
				expect(overlap ? areaM2(overlap.geometry) : 0, `${all[i].properties.name} / ${all[j].properties.name}`).toBe(0);
			}
	});

	test('areas are within 10 % of the brief (GeographicLib, Karney 2013, via geo/area)', () => {
		for (const f of tallowgrass.features) {
			const ha = areaM2(f.geometry) / 1e4;
			expect(Math.abs(ha / TARGET_HA[f.properties.name] - 1), f.properties.name).toBeLessThan(0.1);
		}
		const brennanHa = Object.fromEntries(brennan.features.map((f) => [f.properties.name, areaM2(f.geometry) / 1e4]));
		expect(Math.abs(brennanHa['Creek Bottom'] / 45 - 1)).toBeLessThan(0.1);
		expect(Math.abs(brennanHa['Upper Bench'] / 70 - 1)).toBeLessThan(0.1);
	});

	test('Wetland Quarter and Home Place have a hole of about 8 and 3 ha; Split Forty has two parts of about 35 ha', () => {
		const byName = Object.fromEntries(tallowgrass.features.map((f) => [f.properties.name, f.geometry]));
		const holeHa = (name: string) => {
			const g = byName[name] as Polygon;
			expect(g.type).toBe('Polygon');
			expect(g.coordinates).toHaveLength(2);
			return areaM2({ type: 'Polygon', coordinates: [g.coordinates[1]] }) / 1e4;
		};
		expect(holeHa('Wetland Quarter')).toBeGreaterThan(7);
		expect(holeHa('Wetland Quarter')).toBeLessThan(9);
		expect(holeHa('Home Place')).toBeGreaterThan(2.7);
		expect(holeHa('Home Place')).toBeLessThan(3.3);
		const split = byName['Split Forty'] as MultiPolygon;
		expect(split.type).toBe('MultiPolygon');
		for (const part of split.coordinates) expect(Math.abs(areaM2({ type: 'Polygon', coordinates: part }) / 1e4 / 35 - 1)).toBeLessThan(0.1);
	});

	test.each([['tallowgrass-boundaries.zip'], ['tallowgrass.kml']])('%s reads back with the same ten names and areas within 0.1 %', (name) => {
		const result = parseBoundaryFile(name, file(`demo/boundaries/${name}`));
		if (!result.ok) throw new Error(result.error.message);
		const expected = Object.fromEntries(tallowgrass.features.map((f) => [f.properties.name, areaM2(f.geometry)]));
		expect(result.features.map((f) => String(f.properties.name)).sort()).toEqual(Object.keys(expected).sort());
		for (const f of result.features) expect(Math.abs(areaM2(f.geometry) / expected[String(f.properties.name)] - 1)).toBeLessThan(0.001);
	});
});

describe('manifest', () => {
	test('people, roles and grants as the demo brief names them', () => {
		expect(manifest.password).toBe('patchbook-demo');
		const emails = manifest.users.map((u) => `${u.name} <${u.email}>`);
		for (const u of [
			'Mara Lindqvist <mara@tallowgrass.example>',
			'Dev Okafor <dev@fieldwise-agronomy.example>',
			'Sam Reyes <sam@tallowgrass.example>',
			'Noor Haddad <noor@tallowgrass.example>',
			'Helen Marsh <helen.marsh@landowner.example>',
			'Arvid Lund <arvid.lund@landowner.example>',
			'Tom Achterberg <tom@brennancreek.example>'
		])
			expect(emails).toContain(u);
		const [tallow, brennanFarm] = manifest.farms;
		expect([tallow.slug, brennanFarm.slug]).toEqual(['tallowgrass', 'brennan-creek']);
		expect(tallow.members).toContainEqual({ email: 'dev@fieldwise-agronomy.example', role: 'agronomist' });
		expect(brennanFarm.members).toContainEqual({ email: 'dev@fieldwise-agronomy.example', role: 'agronomist' });
		expect(tallow.grants).toContainEqual({ email: 'helen.marsh@landowner.example', fields: ['North Flat', 'Schoolhouse'], cropSharePercent: 33.3 });
		expect(tallow.grants).toContainEqual({ email: 'arvid.lund@landowner.example', fields: ['Long Hill'], cropSharePercent: 25 });
	});

	test('the main machine is a 120 ft boom of 144 nozzles at 10 in (NIST SP 811: 1 ft = 0.3048 m)', () => {
		const m = manifest.farms[0].catalogue.machines.find((x) => x.name === 'Spot sprayer 36.6 m')!;
		expect(m.boomWidthM).toBeCloseTo(120 * 0.3048, 9);
		expect(m.nozzleSpacingM).toBeCloseTo(10 * 0.0254, 9);
		expect(m.nozzleCount * m.nozzleSpacingM).toBeCloseTo(m.boomWidthM, 9);
		expect(m.nozzlesPerSensor).toBe(4);
	});

	test('every log names a machine, a tank mix, a member and fields of its own farm', () => {
		const files = new Set<string>();
		for (const farm of manifest.farms) {
			const fields = new Set((farm.slug === 'tallowgrass' ? tallowgrass : brennan).features.map((f) => f.properties.name));
			const mixes = new Map(farm.catalogue.tankMixes.map((t) => [t.name, t]));
			const products = new Set(farm.catalogue.products.map((p) => p.name));
			for (const mix of mixes.values()) for (const p of mix.products) expect(products).toContain(p.name);
			for (const log of farm.logs) {
				expect(files.has(log.file), log.file).toBe(false);
				files.add(log.file);
				expect(farm.catalogue.machines.map((m) => m.name)).toContain(log.machine);
				expect(mixes.has(log.tankMix)).toBe(true);
				expect(farm.members.map((m) => m.email)).toContain(log.uploadedBy);
				for (const f of log.fields) expect(fields).toContain(f);
			}
		}
		const knockdown = manifest.farms[0].catalogue.tankMixes.find((t) => t.name === 'Fallow knockdown')!;
		// 100 L/ha = 0.01 L/m2 (1 ha = 10 000 m2, NIST SP 811).
		expect(knockdown.carrierRateLPerM2).toBeCloseTo(0.01, 12);
		expect(knockdown.products.map((p) => p.name)).toEqual(['Glyphosate 540 (demo)', 'Dicamba 480 (demo)']);
	});
});

describe('sample logs', () => {
	const tallowFields = tallowgrass.features.map((f) => f.geometry);
	const names = tallowgrass.features.map((f) => f.properties.name);

	test.each(manifest.samples.map((s) => [s.file, s] as const))('%s reads without errors with its manifest mapping', async (path, s) => {
		const bytes = file(path);
		expect(bytes.length).toBeLessThan(1_000_000);
		const result = await readLog(path.split('/').pop()!, bytes, s.mapping, { nozzleCount: 144 });
		expect(result.errors).toEqual([]);
		const fixes = result.fixes!;
		expect(fixes.count).toBeGreaterThan(1000);
		if (fixes.spray.kind !== 'nozzles') throw new Error('expected nozzle states');
		// Nozzles open in whole sensor groups of 4, and some do open.
		let open = 0;
		const { bits, nozzleWords } = fixes.spray;
		for (let i = 0; i < fixes.count; i++)
			for (let g = 0; g < 36; g++) {
				const states = [0, 1, 2, 3].map((k) => (bits[i * nozzleWords + ((4 * g + k) >> 5)] >>> ((4 * g + k) & 31)) & 1);
				expect(new Set(states).size).toBe(1);
				open += states[0];
			}
		expect(open).toBeGreaterThan(0);
		// Fixes are 0.2 s apart except in GNSS gaps; speeds in the brief's 16-22 km/h while spraying.
		const steps = Array.from({ length: fixes.count - 1 }, (_, i) => Math.round((fixes.timeS[i + 1] - fixes.timeS[i]) * 10) / 10);
		expect(steps.filter((d) => d === 0.2).length / steps.length).toBeGreaterThan(0.98);
		const sprayingKmh = Array.from(fixes.speedMPerS!).filter((_, i) => fixes.master![i] === 1).map((v) => v * 3.6).sort((a, b) => a - b);
		expect(sprayingKmh[Math.floor(sprayingKmh.length / 2)]).toBeGreaterThan(14);
		expect(sprayingKmh[Math.floor(sprayingKmh.length / 2)]).toBeLessThan(23);
		const fields = new Set(s.fields);
		const split = splitByField(fixes.lng, fixes.lat, fixes.count, tallowFields);
		const visited = names.filter((_, k) => split.fixesByField[k].length > 100);
		expect(new Set(visited)).toEqual(fields);
	});

	test('the two-field log has fixes in Coyote Draw and Little Draw (compute/split-by-field)', async () => {
		const s = manifest.samples.find((x) => x.fields.length === 2)!;
		const result = await readLog('sample-two-fields.csv', file(s.file), s.mapping, { nozzleCount: 144 });
		const fixes = result.fixes!;
		const split = splitByField(fixes.lng, fixes.lat, fixes.count, tallowFields);
		expect(split.fixesByField[names.indexOf('Coyote Draw')].length).toBeGreaterThan(500);
		expect(split.fixesByField[names.indexOf('Little Draw')].length).toBeGreaterThan(500);
	});
});

describe('weed story', () => {
	/** Weed pixels per m2 within 60 m of the 2025 Coyote Draw hotspot centre. */
	function hotspotDensity(season: 2024 | 2025 | 2026): number {
		const r = weedRaster(fieldNamed('Coyote Draw'), season, 'spring');
		let n = 0;
		let px = 0;
		for (let row = 0; row < r.rows; row++)
			for (let col = 0; col < r.cols; col++) {
				const e = r.minE + (col + 0.5) * WEED_PIXEL_M;
				const nn = r.minN + (row + 0.5) * WEED_PIXEL_M;
				if (Math.hypot(e - 2360, nn - 2380) < 60) {
					px++;
					n += r.data[row * r.cols + col];
				}
			}
		return n / px;
	}

	test('the Coyote Draw hotspot grows from 2024 to 2025 and is gone after the June 2025 residual', () => {
		const [a, b, c] = [hotspotDensity(2024), hotspotDensity(2025), hotspotDensity(2026)];
		expect(b).toBeGreaterThan(2 * a);
		expect(c).toBeLessThan(0.1 * b);
		const june2025 = fullLogs().find((l) => l.day.startsWith('2025-06') && l.jobs[0].field === 'Coyote Draw')!;
		expect(june2025.tankMix).toBe('Residual patch programme');
	});
});

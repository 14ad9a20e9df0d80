// Every route of the app, read from src/routes, and a probe URL for each: shared by the access
// test (who may reach what) and the security test (CSP, CSRF, error hygiene). A new page or API
// without a probe here fails access.test.ts's first test.
import { readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import postgres from 'postgres';
import { expect } from '@playwright/test';
import { e2eDatabaseUrl, people } from './helpers';

// ---------------------------------------------------------------- the routes, from the tree

/** URL patterns of every page and endpoint (+server.ts): route groups dropped, parameters kept. */
export function routes(dir = 'src/routes', base = ''): { pattern: string; endpoint: boolean }[] {
	const out: { pattern: string; endpoint: boolean }[] = [];
	const names = readdirSync(dir);
	if (names.some((n) => n === '+page.svelte' || n === '+page.server.ts' || n === '+server.ts')) out.push({ pattern: base || '/', endpoint: names.includes('+server.ts') });
	for (const n of names) {
		const path = join(dir, n);
		if (!statSync(path).isDirectory()) continue;
		out.push(...routes(path, /^\(.*\)$/.test(n) ? base : `${base}/${n}`));
	}
	return out;
}
export const routePatterns = () => routes().map((r) => r.pattern);

export type Ids = {
	granted: string; // North Flat, granted to Helen
	notGranted: string; // Long Hill, not granted to Helen
	otherFarmField: string; // a Brennan Creek field
	notGrantedApplication: string;
	notGrantedUpload: string;
	notGrantedRecord: string;
	note: string; // a note in Long Hill
	tile: { z: number; x: number; y: number }; // over Long Hill only
	hiddenNames: string[]; // field names Helen may not see (her farm's others and the other farm's)
	otherFarmNames: string[];
};

/** What is tried for each pattern: a path (with query) per case. `ng` uses ids Helen may not see. */
export type Probe = { method?: 'GET'; url: (ids: Ids) => string; about?: 'not-granted' | 'farm' | 'none' };
export const probes: Record<string, Probe[]> = {
	'/': [{ url: () => '/', about: 'none' }],
	'/logout': [{ url: () => '/logout', about: 'none' }],
	'/login': [{ url: () => '/login', about: 'none' }],
	'/account': [{ url: () => '/account', about: 'none' }],
	'/api/health': [{ url: () => '/api/health', about: 'none' }],
	'/api/me': [{ url: () => '/api/me', about: 'none' }],
	'/api/basemap/[z]/[x]/[y]': [{ url: () => '/api/basemap/3/1/2', about: 'none' }],
	'/[farm]': [{ url: () => '/tallowgrass', about: 'farm' }],
	'/[farm]/calibration': [{ url: () => '/tallowgrass/calibration', about: 'farm' }],
	'/[farm]/catalogue': [{ url: () => '/tallowgrass/catalogue', about: 'farm' }],
	'/[farm]/fields': [{ url: () => '/tallowgrass/fields', about: 'farm' }],
	'/[farm]/fields/import': [{ url: () => '/tallowgrass/fields/import', about: 'farm' }],
	'/[farm]/fields/new': [{ url: () => '/tallowgrass/fields/new', about: 'farm' }],
	'/[farm]/fields/[id=uuid]': [
		{ url: (i) => `/tallowgrass/fields/${i.notGranted}`, about: 'not-granted' },
		{ url: (i) => `/tallowgrass/fields/${i.otherFarmField}`, about: 'not-granted' }
	],
	'/[farm]/fields/[id=uuid]/zones': [
		{ url: (i) => `/tallowgrass/fields/${i.notGranted}/zones`, about: 'not-granted' },
		{ url: (i) => `/tallowgrass/fields/${i.otherFarmField}/zones`, about: 'not-granted' }
	],
	'/[farm]/fields/[id=uuid]/zones/hotspots': [{ url: (i) => `/tallowgrass/fields/${i.notGranted}/zones/hotspots`, about: 'not-granted' }],
	'/[farm]/fields/[id=uuid]/zones/import': [{ url: (i) => `/tallowgrass/fields/${i.notGranted}/zones/import`, about: 'not-granted' }],
	'/[farm]/map': [{ url: () => '/tallowgrass/map', about: 'farm' }],
	'/[farm]/records': [{ url: () => '/tallowgrass/records', about: 'farm' }],
	'/[farm]/records/[id=uuid]': [{ url: (i) => `/tallowgrass/records/${i.notGrantedRecord}`, about: 'not-granted' }],
	'/[farm]/records/csv': [{ url: () => '/tallowgrass/records/csv', about: 'farm' }],
	'/[farm]/records/print': [{ url: () => '/tallowgrass/records/print', about: 'farm' }],
	'/[farm]/savings': [{ url: () => '/tallowgrass/savings', about: 'farm' }],
	'/[farm]/savings/csv': [{ url: () => '/tallowgrass/savings/csv?season=2026', about: 'farm' }],
	'/[farm]/summaries': [{ url: () => '/tallowgrass/summaries', about: 'farm' }],
	'/[farm]/summaries/[field=uuid]': [
		{ url: (i) => `/tallowgrass/summaries/${i.notGranted}?season=2026`, about: 'not-granted' },
		{ url: (i) => `/tallowgrass/summaries/${i.otherFarmField}?season=2026`, about: 'not-granted' }
	],
	'/[farm]/summaries/landlords': [{ url: () => '/tallowgrass/summaries/landlords', about: 'farm' }],
	'/[farm]/summaries/print': [{ url: () => '/tallowgrass/summaries/print?season=2026', about: 'farm' }],
	'/[farm]/summaries/pdf': [
		{ url: () => '/tallowgrass/summaries/pdf?season=2026', about: 'farm' },
		{ url: (i) => `/tallowgrass/summaries/pdf?season=2026&field=${i.notGranted}`, about: 'not-granted' }
	],
	'/[farm]/team': [{ url: () => '/tallowgrass/team', about: 'farm' }],
	'/[farm]/team/audit': [{ url: () => '/tallowgrass/team/audit?kind=fields', about: 'farm' }],
	'/[farm]/team/audit/csv': [{ url: () => '/tallowgrass/team/audit/csv', about: 'farm' }],
	'/invite/[token]': [{ url: () => '/invite/not-a-real-invitation-token', about: 'none' }],
	'/reset-password': [{ url: () => '/reset-password', about: 'none' }],
	'/reset-password/[token]': [{ url: () => '/reset-password/not-a-real-reset-token', about: 'none' }],
	'/[farm]/outbox': [{ url: () => '/tallowgrass/outbox', about: 'farm' }],
	'/[farm]/outbox/[id=uuid]': [{ url: () => '/tallowgrass/outbox/00000000-0000-4000-8000-000000000000', about: 'not-granted' }],
	'/[farm]/uploads': [{ url: () => '/tallowgrass/uploads', about: 'farm' }],
	'/[farm]/uploads/[id=uuid]': [{ url: (i) => `/tallowgrass/uploads/${i.notGrantedUpload}`, about: 'not-granted' }],
	'/api/farms/[farm]/exports/[kind]': [
		{ url: () => '/api/farms/tallowgrass/exports/cells?season=2026&format=csv', about: 'farm' },
		{ url: () => '/api/farms/tallowgrass/exports/hotspots?season=2026&format=geojson', about: 'farm' },
		{ url: () => '/api/farms/tallowgrass/exports/hotspots?compare=2025,2026&format=shp', about: 'farm' },
		{ url: (i) => `/api/farms/tallowgrass/exports/cells?season=2026&format=csv&field=${i.notGranted}`, about: 'not-granted' }
	],
	'/api/farms/[farm]/fields': [{ url: () => '/api/farms/tallowgrass/fields', about: 'farm' }],
	'/api/farms/[farm]/fields/geojson': [{ url: () => '/api/farms/tallowgrass/fields/geojson', about: 'farm' }],
	'/api/farms/[farm]/fields/[id=uuid]/trend': [{ url: (i) => `/api/farms/tallowgrass/fields/${i.notGranted}/trend`, about: 'not-granted' }],
	'/api/farms/[farm]/fields/[id=uuid]/zones/export.geojson': [{ url: (i) => `/api/farms/tallowgrass/fields/${i.notGranted}/zones/export.geojson`, about: 'not-granted' }],
	'/api/farms/[farm]/fields/[id=uuid]/zones/export.zip': [{ url: (i) => `/api/farms/tallowgrass/fields/${i.notGranted}/zones/export.zip`, about: 'not-granted' }],
	'/api/farms/[farm]/fields/[id=uuid]/zones/hotspots': [
		{ url: (i) => `/api/farms/tallowgrass/fields/${i.notGranted}/zones/hotspots?mode=season&season=2026`, about: 'not-granted' }
	],
	'/api/farms/[farm]/fields/[id=uuid]/zones/summary.csv': [{ url: (i) => `/api/farms/tallowgrass/fields/${i.notGranted}/zones/summary.csv?season=2026`, about: 'not-granted' }],
	'/api/farms/[farm]/map/cell': [{ url: (i) => `/api/farms/tallowgrass/map/cell?field=${i.notGranted}&col=3&row=3`, about: 'not-granted' }],
	'/api/farms/[farm]/map/meta': [{ url: () => '/api/farms/tallowgrass/map/meta', about: 'farm' }],
	'/api/farms/[farm]/map/quality': [{ url: (i) => `/api/farms/tallowgrass/map/quality?application=${i.notGrantedApplication}`, about: 'not-granted' }],
	'/api/farms/[farm]/map/summary': [{ url: () => '/api/farms/tallowgrass/map/summary?season=2026', about: 'farm' }],
	'/api/farms/[farm]/notes': [{ url: () => '/api/farms/tallowgrass/notes', about: 'farm' }],
	'/api/farms/[farm]/notes/[id]/photo': [{ url: (i) => `/api/farms/tallowgrass/notes/${i.note}/photo`, about: 'not-granted' }],
	'/api/farms/[farm]/team': [{ url: () => '/api/farms/tallowgrass/team', about: 'farm' }],
	'/api/farms/[farm]/tiles/cells/[z]/[x]/[y]': [
		{ url: (i) => `/api/farms/tallowgrass/tiles/cells/${i.tile.z}/${i.tile.x}/${i.tile.y}?season=2026`, about: 'not-granted' }
	],
	'/api/farms/[farm]/uploads': [{ url: () => '/api/farms/tallowgrass/uploads', about: 'farm' }]
};

// ---------------------------------------------------------------- the data the probes use

/**
 * The ids the probes use, read from the e2e database. A note in Long Hill is made once (and
 * found again on later calls), so the photo route has an id to be refused for.
 */
export async function loadIds(): Promise<Ids> {
	const sql = postgres(e2eDatabaseUrl, { max: 1, onnotice: () => {} });
	try {
		const fields = await sql<{ id: string; name: string; slug: string; boundary: { coordinates: number[][][] } }[]>`
			select f.id, f.name, fa.slug, f.boundary from fields f join farms fa on fa.id = f.farm_id`;
		const helen = await sql<{ field_id: string }[]>`select g.field_id from landlord_grants g join users u on u.id = g.user_id where u.email = ${people.landlord}`;
		const grantedIds = new Set(helen.map((g) => g.field_id));
		const byName = (name: string) => fields.find((f) => f.name === name && f.slug === 'tallowgrass')!;
		const longHill = byName('Long Hill');
		expect(grantedIds.has(longHill.id)).toBe(false);
		expect(grantedIds.has(byName('North Flat').id)).toBe(true);
		const [app] = await sql<{ id: string; upload_id: string }[]>`select a.id, x.upload_id from applications a join application_fixes x on x.application_id = a.id
			where a.field_id = ${longHill.id} order by a.day limit 1`;
		const [record] = await sql<{ id: string }[]>`select id from application_records where application_id = ${app.id}`.catch(() => [] as { id: string }[]);
		const [manager] = await sql<{ id: string; farm_id: string }[]>`select u.id, m.farm_id from users u join memberships m on m.user_id = u.id where u.email = ${people.manager}`;
		// Made once, found again on later calls.
		const [found] = await sql<{ id: string }[]>`select id from notes where field_id = ${longHill.id} and body = 'Access test note' limit 1`;
		const [note] = found ? [found] : await sql<{ id: string }[]>`insert into notes (farm_id, field_id, season, lng, lat, body, author_id)
			values (${manager.farm_id}, ${longHill.id}, 2026, ${longHill.boundary.coordinates[0][0][0]}, ${longHill.boundary.coordinates[0][0][1]}, 'Access test note', ${manager.id}) returning id`;
		// The z17 tile over Long Hill's middle (Web Mercator tile scheme).
		const ring = longHill.boundary.coordinates[0];
		const lng = ring.reduce((s, p) => s + p[0], 0) / ring.length;
		const lat = ring.reduce((s, p) => s + p[1], 0) / ring.length;
		const z = 17;
		const n = 2 ** z;
		const rad = (lat * Math.PI) / 180;
		const tile = { z, x: Math.floor(((lng + 180) / 360) * n), y: Math.floor(((1 - Math.log(Math.tan(rad) + 1 / Math.cos(rad)) / Math.PI) / 2) * n) };
		const other = fields.filter((f) => f.slug !== 'tallowgrass');
		return {
			granted: byName('North Flat').id,
			notGranted: longHill.id,
			otherFarmField: other[0].id,
			notGrantedApplication: app.id,
			notGrantedUpload: app.upload_id,
			notGrantedRecord: record?.id ?? app.id,
			note: note.id,
			tile,
			hiddenNames: fields.filter((f) => !grantedIds.has(f.id)).map((f) => f.name),
			otherFarmNames: other.map((f) => f.name)
		};
	} finally {
		await sql.end();
	}
}

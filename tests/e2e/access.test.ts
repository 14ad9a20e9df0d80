// Who may reach what, route by route. The routes are read from src/routes, so a new page or API
// without a probe here fails the first test: every route is tried as a landlord (with fields not
// granted to her), as the manager of another farm, as an operator and without a session, with
// the ids of other fields and other farms. A refusal is 403 or 404 (204 for an empty tile); an
// answer that is allowed must not carry what the person may not see (names and ids of fields
// not granted, the other farm's fields, prices for operators).
import { readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { expect, test, type APIRequestContext, type Browser } from '@playwright/test';
import { strFromU8, unzipSync } from 'fflate';
import postgres from 'postgres';
import { e2eDatabaseUrl, people, signIn } from './helpers';

// ---------------------------------------------------------------- the routes, from the tree

/** URL patterns of every page and endpoint (+server.ts): route groups dropped, parameters kept. */
function routes(dir = 'src/routes', base = ''): { pattern: string; endpoint: boolean }[] {
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
const routePatterns = () => routes().map((r) => r.pattern);

type Ids = {
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
type Probe = { method?: 'GET'; url: (ids: Ids) => string; about?: 'not-granted' | 'farm' | 'none' };
const probes: Record<string, Probe[]> = {
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

let ids: Ids;

test.beforeAll(async () => {
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
		// A note in Long Hill made here, so the photo route has an id to be refused for.
		const [note] = await sql<{ id: string }[]>`insert into notes (farm_id, field_id, season, lng, lat, body, author_id)
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
		ids = {
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
});

// ---------------------------------------------------------------- helpers

async function as(browser: Browser, who: string | null): Promise<{ request: APIRequestContext; close: () => Promise<void> }> {
	const context = await browser.newContext();
	if (who) await signIn(await context.newPage(), who);
	return { request: context.request, close: () => context.close() };
}

/** The response's readable text: zips are opened (a shapefile's DBF holds the names). */
async function textOf(body: Buffer, type: string): Promise<string> {
	if (type.includes('zip')) {
		return Object.values(unzipSync(new Uint8Array(body)))
			.map((b) => strFromU8(b, true))
			.join('\n');
	}
	return body.toString('latin1');
}

const allCases = () => {
	const endpoints = new Set(routes().filter((r) => r.endpoint).map((r) => r.pattern));
	return Object.entries(probes).flatMap(([pattern, list]) => list.map((p) => ({ pattern, url: p.url(ids), about: p.about ?? 'farm', endpoint: endpoints.has(pattern) })));
};

// ---------------------------------------------------------------- the tests

test('every route in src/routes has a probe here', () => {
	const missing = routePatterns().filter((p) => !(p in probes));
	const stale = Object.keys(probes).filter((p) => !routePatterns().includes(p));
	expect(missing, 'routes without a probe: add them to `probes`').toEqual([]);
	expect(stale, 'probes for routes that are gone').toEqual([]);
});

test('a landlord reaches nothing beyond her granted fields through any page, API, tile or export', async ({ browser }) => {
	test.setTimeout(180_000);
	const landlord = await as(browser, people.landlord);
	try {
		for (const c of allCases()) {
			const r = await landlord.request.get(c.url, { maxRedirects: 0 });
			const status = r.status();
			if (c.about === 'not-granted') expect([204, 403, 404], `${c.url} → ${status}`).toContain(status);
			else expect([200, 204, 303, 403, 404], `${c.url} → ${status}`).toContain(status);
			if (status !== 200) continue;
			const text = await textOf(await r.body(), r.headers()['content-type'] ?? '');
			for (const name of ids.hiddenNames) expect(text.includes(name), `${c.url} shows “${name}”`).toBe(false);
			for (const id of [ids.notGranted, ids.otherFarmField]) expect(text.includes(id), `${c.url} carries a hidden field's id`).toBe(false);
		}
		// Other farms' paths: not found, whatever the route.
		for (const c of allCases().filter((x) => x.url.includes('/tallowgrass'))) {
			const url = c.url.replace('/tallowgrass', '/brennan-creek');
			const r = await landlord.request.get(url, { maxRedirects: 0 });
			expect(r.status(), url).toBe(404);
		}
	} finally {
		await landlord.close();
	}
});

test('the manager of another farm gets 404 for every route of this farm', async ({ browser }) => {
	test.setTimeout(120_000);
	const other = await as(browser, people.otherFarmManager);
	try {
		for (const c of allCases().filter((x) => x.url.includes('/tallowgrass'))) {
			const r = await other.request.get(c.url, { maxRedirects: 0 });
			expect(r.status(), c.url).toBe(404);
			const text = await textOf(await r.body(), r.headers()['content-type'] ?? '');
			for (const name of ids.hiddenNames.filter((n) => !ids.otherFarmNames.includes(n))) expect(text.includes(name), `${c.url} shows “${name}”`).toBe(false);
		}
		// His own farm's paths with this farm's field ids: not found either.
		for (const url of [`/brennan-creek/fields/${ids.notGranted}`, `/api/farms/brennan-creek/fields/${ids.notGranted}/trend`, `/api/farms/brennan-creek/exports/cells?season=2026&format=csv&field=${ids.notGranted}`]) {
			const r = await other.request.get(url, { maxRedirects: 0 });
			expect([400, 404], url).toContain(r.status());
		}
	} finally {
		await other.close();
	}
});

test('an operator sees no prices and no team, on any route', async ({ browser }) => {
	test.setTimeout(120_000);
	const operator = await as(browser, people.operator);
	// Money travels under these names in page data and JSON; a number after one is a leak.
	const money = /\b(pricePerUnit|appliedCost|broadcastCost|savedCost|costPerArea\w*|herbicideCost\w*|landlordShare\w*)"?\s*:\s*-?\d/;
	// The same pages carry those numbers for a manager: the pattern can see a leak.
	const manager = await as(browser, people.manager);
	for (const url of ['/tallowgrass/catalogue', '/tallowgrass/savings']) expect(await (await manager.request.get(url)).text(), url).toMatch(money);
	await manager.close();
	try {
		for (const c of allCases()) {
			const r = await operator.request.get(c.url, { maxRedirects: 0 });
			if (/\/team\b|\/savings\b/.test(c.url)) expect(r.status(), c.url).toBe(403);
			if (r.status() !== 200) continue;
			const text = await textOf(await r.body(), r.headers()['content-type'] ?? '');
			expect(text, `${c.url} carries a price`).not.toMatch(money);
			expect(text, `${c.url} has a money column`).not.toMatch(/_(usd|eur|gbp|cad|aud)\b/i);
		}
	} finally {
		await operator.close();
	}
});

test('without a session, pages send you to sign in and APIs answer 401', async ({ browser }) => {
	const anonymous = await as(browser, null);
	const open = new Set(['/', '/login', '/logout', '/api/health', '/invite/not-a-real-invitation-token', '/reset-password', '/reset-password/not-a-real-reset-token']);
	try {
		for (const c of allCases()) {
			const path = c.url.split('?')[0];
			if (open.has(path)) continue;
			const r = await anonymous.request.get(c.url, { maxRedirects: 0 });
			if (path.startsWith('/api/')) expect(r.status(), c.url).toBe(401);
			// A download beside a page (CSV) may send you to sign in and back, like the page.
			else if (c.endpoint && r.status() === 401) continue;
			else {
				expect(r.status(), c.url).toBe(303);
				expect(r.headers().location, c.url).toMatch(/^\/login\?next=/);
			}
		}
	} finally {
		await anonymous.close();
	}
});

// Who may reach what, route by route. The routes are read from src/routes, so a new page or API
// without a probe here fails the first test: every route is tried as a landlord (with fields not
// granted to her), as the manager of another farm, as an operator and without a session, with
// the ids of other fields and other farms. A refusal is 403 or 404 (204 for an empty tile); an
// answer that is allowed must not carry what the person may not see (names and ids of fields
// not granted, the other farm's fields, prices for operators).
import { expect, test, type APIRequestContext, type Browser } from '@playwright/test';
import { strFromU8, unzipSync } from 'fflate';
import { people, signIn } from './helpers';
import { loadIds, probes, routePatterns, routes, type Ids } from './routes';

let ids: Ids;

test.beforeAll(async () => {
	ids = await loadIds();
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

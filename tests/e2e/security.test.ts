// Security in the real browser and over HTTP, for every route read from src/routes (routes.ts):
// - the Content-Security-Policy lets every page run, MapLibre and terra-draw included, with no
//   violation, while an injected inline script is refused;
// - every form action and every write endpoint refuses a cross-site request (foreign Origin, or
//   the browser's Sec-Fetch-Site) in each content type a browser can send, and nothing changes;
// - malformed requests to every route never answer with a stack trace, a file path or SQL.
import { readFileSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { expect, test, type APIRequestContext, type Browser, type Page } from '@playwright/test';
import postgres from 'postgres';
import ts from 'typescript';
import { e2eDatabaseUrl, people, signIn } from './helpers';
import { loadIds, probes, type Ids } from './routes';

const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };
const foreignOrigin = 'https://evil.example';

let ids: Ids;
test.beforeAll(async () => {
	ids = await loadIds();
});

// ---------------------------------------------------------------- what the source tree declares

type RouteFile = { pattern: string; file: string };

/** Every +page.server.ts and +server.ts with its URL pattern (route groups dropped), as routes.ts does. */
function routeFiles(name: '+page.server.ts' | '+server.ts', dir = 'src/routes', base = ''): RouteFile[] {
	const out: RouteFile[] = [];
	for (const n of readdirSync(dir)) {
		const path = join(dir, n);
		if (statSync(path).isDirectory()) out.push(...routeFiles(name, path, /^\(.*\)$/.test(n) ? base : `${base}/${n}`));
		else if (n === name) out.push({ pattern: base || '/', file: path });
	}
	return out;
}

/** The exported declarations of a module, parsed with the TypeScript compiler (not a regex). */
function exportsOf(file: string) {
	const source = ts.createSourceFile(file, readFileSync(file, 'utf8'), ts.ScriptTarget.Latest, true);
	const found = new Map<string, ts.Node>();
	for (const statement of source.statements) {
		const exported = ts.canHaveModifiers(statement) && ts.getModifiers(statement)?.some((m) => m.kind === ts.SyntaxKind.ExportKeyword);
		if (ts.isVariableStatement(statement) && exported) {
			for (const d of statement.declarationList.declarations) if (ts.isIdentifier(d.name)) found.set(d.name.text, d.initializer ?? d);
		} else if (ts.isFunctionDeclaration(statement) && exported && statement.name) found.set(statement.name.text, statement);
		else if (ts.isExportDeclaration(statement) && statement.exportClause && ts.isNamedExports(statement.exportClause)) {
			for (const e of statement.exportClause.elements) found.set(e.name.text, e);
		}
	}
	return found;
}

/** Names of the form actions in `export const actions = { … }` ('default' included). */
function actionNames(file: string): string[] {
	let init = exportsOf(file).get('actions');
	if (!init) return [];
	while (init && (ts.isSatisfiesExpression(init) || ts.isAsExpression(init) || ts.isParenthesizedExpression(init))) init = init.expression;
	if (!init || !ts.isObjectLiteralExpression(init)) throw new Error(`${file}: actions is not an object literal; teach security.test.ts to read it`);
	return init.properties.map((p) => {
		if (!p.name || !(ts.isIdentifier(p.name) || ts.isStringLiteral(p.name))) throw new Error(`${file}: an action with a computed name`);
		return p.name.text;
	});
}

const writeMethods = ['POST', 'PUT', 'PATCH', 'DELETE'] as const;

/** Every form action and write handler, each with the URL it is tried at. */
function writeTargets(): { what: string; method: string; url: string }[] {
	const urlFor = (pattern: string) => {
		const probe = probes[pattern]?.[0];
		if (!probe) throw new Error(`${pattern} has no probe in routes.ts`);
		return probe.url(ids).split('?')[0];
	};
	const actions = routeFiles('+page.server.ts').flatMap(({ pattern, file }) =>
		actionNames(file).map((name) => ({ what: `${pattern} action ${name}`, method: 'POST', url: name === 'default' ? urlFor(pattern) : `${urlFor(pattern)}?/${name}` }))
	);
	const handlers = routeFiles('+server.ts').flatMap(({ pattern, file }) => {
		const exported = exportsOf(file);
		return writeMethods.filter((m) => exported.has(m)).map((method) => ({ what: `${pattern} ${method}`, method, url: urlFor(pattern) }));
	});
	return [...actions, ...handlers];
}

/** The four kinds of body a browser (or a page script) can send, each with its content type. */
const bodies: { type: string; contentType: string; body: string }[] = [
	{ type: 'form-urlencoded', contentType: 'application/x-www-form-urlencoded', body: 'name=Taken&threshold=1&email=x%40y.example' },
	{
		type: 'multipart',
		contentType: 'multipart/form-data; boundary=----pb',
		body: '------pb\r\nContent-Disposition: form-data; name="name"\r\n\r\nTaken\r\n------pb--\r\n'
	},
	{ type: 'text/plain', contentType: 'text/plain', body: 'name=Taken' },
	{ type: 'json', contentType: 'application/json', body: '{"name":"Taken"}' }
];

// ---------------------------------------------------------------- helpers

async function signedIn(browser: Browser, who: string): Promise<{ page: Page; request: APIRequestContext; close: () => Promise<void> }> {
	const context = await browser.newContext({ viewport: viewports.desktop });
	const page = await context.newPage();
	await signIn(page, who);
	return { page, request: context.request, close: () => context.close() };
}

/**
 * A fingerprint of every row of every table in the app's schema, except sessions (which a
 * signed-in browser renews as it goes). Equal before and after means nothing was written.
 */
async function databaseFingerprint(): Promise<Record<string, string>> {
	const sql = postgres(e2eDatabaseUrl, { max: 1, onnotice: () => {} });
	try {
		const tables = await sql<{ name: string }[]>`select table_name as name from information_schema.tables
			where table_schema = 'public' and table_type = 'BASE TABLE' and table_name not in ('sessions') order by 1`;
		const out: Record<string, string> = {};
		for (const { name } of tables) {
			const [row] = await sql.unsafe(`select count(*)::text || ':' || coalesce(sum(hashtext(t::text)::bigint), 0)::text as f from "${name}" t`);
			out[name] = row.f;
		}
		return out;
	} finally {
		await sql.end();
	}
}

// ---------------------------------------------------------------- 1. Content-Security-Policy

/** Violations reported in the page (securitypolicyviolation events) and CSP errors in the console. */
async function watchViolations(page: Page): Promise<string[]> {
	const seen: string[] = [];
	await page.exposeBinding('__reportCspViolation', (_source, text: string) => void seen.push(text));
	await page.addInitScript(() => {
		document.addEventListener('securitypolicyviolation', (e) => {
			(window as unknown as { __reportCspViolation: (t: string) => void }).__reportCspViolation(`${e.violatedDirective} blocked ${e.blockedURI || 'inline'} at ${e.sourceFile}:${e.lineNumber} ${e.sample}`);
		});
	});
	page.on('console', (m) => {
		if (/Content Security Policy|Refused to (load|execute|apply|connect|create|frame)/i.test(m.text())) seen.push(`console: ${m.text()}`);
	});
	page.on('pageerror', (e) => {
		if (/Content Security Policy|unsafe-eval/i.test(e.message)) seen.push(`pageerror: ${e.message}`);
	});
	return seen;
}

async function settled(page: Page) {
	await page.locator('html[data-hydrated="true"]').waitFor({ timeout: 30_000 }).catch(() => {});
	const map = page.locator('[data-testid="map"]');
	if (await map.count()) await expect(map.first()).toHaveAttribute('data-map-idle', 'true', { timeout: 40_000 });
}

test('the policy is strict: nonces for scripts, no eval, no framing, no plugins; an injected inline script is refused', async ({ page }) => {
	const seen = await watchViolations(page);
	const response = await page.goto('/login');
	const csp = response!.headers()['content-security-policy'];
	expect(csp, 'a CSP header on server-rendered pages').toBeTruthy();
	const directives = Object.fromEntries(csp.split(';').map((d) => d.trim().split(/\s+/)).map(([k, ...v]) => [k, v]));
	expect(directives['script-src']).toContain("'self'");
	expect(directives['script-src'].some((v: string) => v.startsWith("'nonce-"))).toBe(true);
	expect(csp).not.toContain('unsafe-eval');
	expect(directives['script-src']).not.toContain("'unsafe-inline'");
	expect(directives['frame-ancestors']).toEqual(["'none'"]);
	expect(directives['object-src']).toEqual(["'none'"]);
	expect(directives['base-uri']).toEqual(["'self'"]);
	expect(directives['form-action']).toEqual(["'self'"]);
	expect(directives['connect-src']).toEqual(["'self'"]);
	expect(directives['worker-src']).toEqual(["'self'", 'blob:']);
	// The other headers, on a page and on an API answer.
	for (const headers of [response!.headers(), (await page.request.get('/api/health')).headers()]) {
		expect(headers['cross-origin-opener-policy']).toBe('same-origin');
		expect(headers['permissions-policy']).toContain('camera=()');
		expect(headers['x-frame-options']).toBe('DENY');
		// Served over http here: no HSTS (it is sent over https only; see the unit test).
		expect(headers['strict-transport-security']).toBeUndefined();
	}
	// The watcher sees a violation when there is one: an inline script without the nonce.
	await page.locator('html[data-hydrated="true"]').waitFor();
	const ran = await page.evaluate(() => {
		const s = document.createElement('script');
		s.textContent = 'window.__injected = true';
		document.body.append(s);
		return (window as unknown as { __injected?: boolean }).__injected === true;
	});
	expect(ran, 'an inline script without the nonce must not run').toBe(false);
	await expect.poll(() => seen.length).toBeGreaterThan(0);
	expect(seen.join('\n')).toMatch(/script-src/);
});

test('every page opens as the manager with no CSP violation; the map, field and zone pages draw and terra-draw draws', async ({ browser }) => {
	test.setTimeout(600_000);
	const { page, close } = await signedIn(browser, people.manager);
	try {
		const seen = await watchViolations(page);
		const pages = routeFiles('+page.server.ts').map((r) => r.pattern);
		const pageUrls = Object.entries(probes)
			.filter(([pattern]) => pages.includes(pattern) || !routeFiles('+server.ts').some((r) => r.pattern === pattern))
			.filter(([pattern]) => pattern !== '/logout') // signing out would end the walk
			.flatMap(([, list]) => list.map((p) => p.url(ids)));
		expect(pageUrls.length).toBeGreaterThan(20);
		for (const url of pageUrls) {
			const before = seen.length;
			await page.goto(url);
			await settled(page);
			expect(seen.slice(before), `CSP violations on ${url}`).toEqual([]);
		}

		// A message in the development outbox: its HTML part (inline styles, as mail needs) shows
		// in the sandboxed srcdoc frame under this policy.
		const sql = postgres(e2eDatabaseUrl, { max: 1, onnotice: () => {} });
		let mailId: string;
		try {
			const [farm] = await sql<{ id: string }[]>`select id from farms where slug = 'tallowgrass'`;
			[{ id: mailId }] = await sql<{ id: string }[]>`insert into dev_outbox (envelope_from, envelope_to, subject, farm_id, kind, text_body, html_body, raw)
				values ('patchbook@localhost', ${[people.manager]}, 'CSP check', ${farm.id}, 'csp-check', 'Plain part',
				'<p style="color:#7a4b2a;font-weight:bold" data-x>Styled part</p>', 'raw') returning id`;
		} finally {
			await sql.end();
		}
		const before = seen.length;
		await page.goto(`/tallowgrass/outbox/${mailId}`);
		const styled = page.frameLocator('[data-testid="mail-html"]').getByText('Styled part');
		await expect(styled).toBeVisible();
		await expect(styled).toHaveCSS('font-weight', '700');
		expect(seen.slice(before), 'CSP violations on the outbox message').toEqual([]);

		// The farm map, a field page and the zones page with a zone drawn (not saved), at both sizes.
		const longHill = ids.notGranted; // Mara's field (not granted to the landlord)
		for (const [size, viewport] of Object.entries(viewports)) {
			await page.setViewportSize(viewport);
			for (const [name, url] of [['map', '/tallowgrass/map'], ['field', `/tallowgrass/fields/${longHill}`]] as const) {
				await page.goto(url);
				await settled(page);
				await expect(page.locator('.maplibregl-canvas').first()).toBeVisible();
				await page.screenshot({ path: `tests/screenshots/security-csp-${name}-${size}.png`, fullPage: true });
			}
			await page.goto(`/tallowgrass/fields/${longHill}/zones`);
			await settled(page);
			await page.getByRole('button', { name: 'Draw a zone' }).click();
			await expect(page.getByTestId('boundary-editor')).toBeVisible();
			await settled(page);
			const box = (await page.getByTestId('map').first().boundingBox())!;
			for (const [fx, fy] of [[0.4, 0.4], [0.6, 0.4], [0.6, 0.6], [0.4, 0.6], [0.4, 0.4]]) {
				await page.mouse.click(box.x + box.width * fx, box.y + box.height * fy);
				await page.waitForTimeout(150);
			}
			await expect(page.getByTestId('zone-draw-form')).toContainText(/Drawn: [\d.]+ (ha|ac)/);
			await page.screenshot({ path: `tests/screenshots/security-csp-zone-drawn-${size}.png`, fullPage: true });
		}
		expect(seen, 'CSP violations on the map pages').toEqual([]);
	} finally {
		await close();
	}
});

// ---------------------------------------------------------------- 2. cross-site writes

test('every form action and write endpoint refuses a cross-site request in every content type, and nothing changes', async ({ browser }) => {
	test.setTimeout(300_000);
	const targets = writeTargets();
	// The walk found the actions this app has (a sample that must be among them).
	expect(targets.map((t) => t.what)).toEqual(expect.arrayContaining(['/[farm]/fields/new action default', '/[farm]/team action invite', '/api/farms/[farm]/uploads POST', '/logout action default']));
	expect(targets.length).toBeGreaterThan(25);
	const manager = await signedIn(browser, people.manager);
	try {
		const before = await databaseFingerprint();
		// A foreign Origin, a sandboxed frame's Origin "null", and a browser's cross-site fetch
		// metadata without an Origin.
		const senders: Record<string, Record<string, string>> = {
			'foreign Origin': { origin: foreignOrigin },
			'Origin null': { origin: 'null' },
			'Sec-Fetch-Site cross-site': { 'sec-fetch-site': 'cross-site' }
		};
		for (const t of targets) {
			for (const b of bodies) {
				for (const [sender, headers] of Object.entries(senders)) {
					const r = await manager.request.fetch(t.url, { method: t.method, headers: { ...headers, 'content-type': b.contentType }, data: b.body, maxRedirects: 0 });
					expect(r.status(), `${t.what} (${t.url}), ${b.type}, ${sender}`).toBe(403);
					expect(await r.text()).toMatch(/Cross-site \w+ (form submissions|requests) are forbidden/);
				}
			}
		}
		expect(await databaseFingerprint(), 'no table changed').toEqual(before);
		// The manager is still signed in (the refused logout did not sign her out).
		expect((await manager.request.get('/api/me')).status()).toBe(200);

		// The same requests from the app's own origin do reach the app (the refusals above are
		// the origin check, not a route that refuses everything): a threshold that is not a
		// number is answered by the action, a JSON upload without a name by the endpoint.
		const origin = new URL(manager.page.url()).origin;
		const form = await manager.request.post('/tallowgrass/map?/threshold', { headers: { origin }, form: { threshold: 'lots' }, maxRedirects: 0 });
		expect(form.status()).not.toBe(403);
		expect(await form.text()).not.toContain('Cross-site');
		const api = await manager.request.post('/api/farms/tallowgrass/uploads', { headers: { origin, 'content-type': 'application/json' }, data: '{}' });
		expect(api.status()).toBe(400);
		expect(await api.text()).toContain('Say the file name');
	} finally {
		await manager.close();
	}
});

// ---------------------------------------------------------------- 3. error hygiene

/** What must never reach a client: stack frames, source paths, SQL and driver errors. */
const leaks: [string, RegExp][] = [
	['stack frame', /^\s*at\s+(async\s+)?\S.*:\d+:\d+\)?\s*$/m],
	['node_modules path', /node_modules/],
	['source file path', /(\/(work|home|root|srv|opt|usr)\/[\w.-]+\/)|\b[\w-]+\.(ts|js|mjs|cjs):\d+(:\d+)?\b/],
	['SQL error', /syntax error at|relation "|violates (not-null|foreign key|unique|check) constraint|invalid input syntax|duplicate key value|out of range for type|column "[^"]+" (does not exist|of relation)|Failed query/i],
	['driver or runtime error name', /\b(PostgresError|DrizzleQueryError|DrizzleError|ZodError|TypeError|RangeError|ReferenceError|SyntaxError|ECONNREFUSED|ERR_[A-Z_]+)\b/]
];

function leakIn(text: string): string | null {
	for (const [name, pattern] of leaks) {
		const m = text.match(pattern);
		if (m) return `${name}: “${m[0].slice(0, 120)}”`;
	}
	return null;
}

test('the leak patterns catch what they are for', () => {
	const error = new TypeError('x');
	expect(leakIn(String(error.stack))).not.toBeNull();
	expect(leakIn('PostgresError: invalid input syntax for type uuid: "abc"')).not.toBeNull();
	expect(leakIn('Failed query: select "id" from "fields" where "id" = $1')).not.toBeNull();
	expect(leakIn('error: relation "fieldz" does not exist')).not.toBeNull();
	expect(leakIn('<p>Something went wrong on our side.</p> reference <code>1a2b3c4d</code>')).toBeNull();
});

/** Variants of a URL that are wrong in the path, the query or the numbers. */
function malformed(url: string): string[] {
	const [path, query = ''] = url.split('?');
	const out = new Set<string>();
	const uuid = /[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}/i;
	if (uuid.test(path)) {
		for (const bad of ['not-a-uuid', '00000000-0000-4000-8000-000000000000', "1'%20or%20'1'='1", '%00', 'a'.repeat(300)]) out.add(path.replace(uuid, bad) + (query ? `?${query}` : ''));
	}
	// Numbers in the path (tiles): huge, negative, fractional, not numbers.
	if (/\/\d+\/\d+\/\d+$/.test(path)) {
		for (const bad of ['99999999999999999999', '-1', '1.5', 'x', '1e400']) out.add(path.replace(/\d+$/, bad) + (query ? `?${query}` : ''));
		out.add(path.replace(/\/\d+\/(\d+)\/(\d+)$/, '/999/$1/$2'));
	}
	// Each query value made wrong, and the usual parameters added wrong.
	const params = new URLSearchParams(query);
	for (const key of new Set([...params.keys(), 'season', 'field'])) {
		for (const bad of ['abc', '99999999999999999999999', '-1.5', "'", '%zz']) {
			const p = new URLSearchParams(params);
			p.set(key, bad);
			out.add(`${path}?${p.toString().replace('%25zz', '%zz')}`);
		}
	}
	return [...out];
}

async function expectClean(r: Awaited<ReturnType<APIRequestContext['fetch']>>, what: string) {
	const type = r.headers()['content-type'] ?? '';
	const status = r.status();
	expect(status, `${what} answered ${status}`).toBeLessThan(600);
	if (!/^(text\/|application\/(json|geo\+json|xml|javascript))/.test(type) && type !== '') return;
	const text = await r.text();
	expect(leakIn(text), `${what} → ${status} leaks`).toBeNull();
	if (status >= 500) {
		expect(text, `${what} → ${status}: only the generic sentence`).toContain('Something went wrong on our side.');
		expect(text, `${what} → ${status}: with an id`).toMatch(/[0-9a-f]{8}/);
	}
}

test('malformed requests to every route answer without stack traces, paths or SQL; 500s only with the generic sentence and an id', async ({ browser }) => {
	test.setTimeout(900_000);
	const manager = await signedIn(browser, people.manager);
	const origin = new URL(manager.page.url()).origin;
	let tried = 0;
	try {
		const before = await databaseFingerprint();
		for (const [pattern, list] of Object.entries(probes)) {
			if (pattern === '/logout') continue; // its only action signs out and reads no body
			const url = list[0].url(ids);
			for (const bad of malformed(url)) {
				await expectClean(await manager.request.get(bad, { maxRedirects: 0 }), `GET ${bad}`);
				tried++;
			}
			// Methods the route does not have (or has), with a broken JSON body, from our own origin.
			for (const method of ['PUT', 'PATCH', 'DELETE', 'OPTIONS']) {
				await expectClean(await manager.request.fetch(url, { method, headers: { origin, 'content-type': 'application/json' }, data: '{"broken": ', maxRedirects: 0 }), `${method} ${url}`);
				tried++;
			}
		}
		// Broken bodies to every form action and write endpoint, from our own origin: bodies no
		// parser can read (a well-formed form could legitimately change a setting). Routes with an
		// id get an id that does not exist, so nothing could change even if a body were read.
		for (const t of writeTargets()) {
			if (t.url === '/logout') continue;
			const url = t.url.replace(/[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}/i, '00000000-0000-4000-8000-000000000000');
			const broken = [
				{ contentType: 'multipart/form-data; boundary=----pb', body: '------pb\r\nContent-Disposition: form-data; name="x"\r\n\r\nno end' },
				{ contentType: 'multipart/form-data', body: 'no boundary at all' },
				{ contentType: 'multipart/form-data; boundary=----pb', body: '\u0000\u00ff garbage, no parts' },
				{ contentType: 'application/json', body: '{"broken": ' },
				{ contentType: 'application/json', body: '{"season": 1e400, "id": "not-a-uuid"}' }
			];
			for (const b of broken) {
				const r = await manager.request.fetch(url, { method: t.method, headers: { origin, 'content-type': b.contentType }, data: b.body, maxRedirects: 0 });
				await expectClean(r, `${t.method} ${url} (${b.contentType}, broken)`);
				tried++;
			}
		}
		expect(tried).toBeGreaterThan(500);
		expect(await databaseFingerprint(), 'malformed requests changed nothing').toEqual(before);
	} finally {
		await manager.close();
	}
});

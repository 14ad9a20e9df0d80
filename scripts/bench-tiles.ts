// Tile and map bench against a running built app with the demo farm loaded:
//   DATABASE_URL=… npx tsx scripts/load-demo.ts; PATCHBOOK_WORKER=off PORT=4186 node build
//   BENCH_URL=http://127.0.0.1:4186 npx tsx scripts/bench-tiles.ts
// 1. Signs in as the demo manager, lists every cells tile over the demo farm at z12..z18 and runs
//    autocannon (20 connections) once through the list (cold: the server's tile cache starts
//    empty only on a fresh server) and again (warm); p50/p95 per zoom and overall.
// 2. In headless Chromium: navigation to first map `idle` on /tallowgrass/map versus a bare page
//    with only the basemap (served by this script, maplibre-gl from node_modules, basemap tiles
//    proxied to the app), and the browser's RSS.
// Targets (issue 5): tile p95 < 50 ms; first idle within 1.5x of bare; browser memory < 1.3 GB.
import { readdirSync, readFileSync } from 'node:fs';
import { createServer, request as httpRequest } from 'node:http';
import { join, resolve } from 'node:path';
import autocannon from 'autocannon';
import { chromium } from '@playwright/test';
import { tilesForBbox, type Bbox } from '../src/lib/geo/tiles';

const base = process.env.BENCH_URL ?? 'http://127.0.0.1:4186';
const email = process.env.BENCH_EMAIL ?? 'mara@tallowgrass.example';
const password = process.env.BENCH_PASSWORD ?? 'patchbook-demo';
const farm = process.env.BENCH_FARM ?? 'tallowgrass';
const connections = Number(process.env.BENCH_CONNECTIONS ?? 20);
const root = resolve(import.meta.dirname, '..');

async function signIn(): Promise<string> {
	const res = await fetch(`${base}/login`, {
		method: 'POST',
		redirect: 'manual',
		// Without Accept: text/html SvelteKit answers a form action in its enhance format (toolchain.md, pitfall 16).
		headers: { accept: 'text/html', 'content-type': 'application/x-www-form-urlencoded', origin: base },
		body: new URLSearchParams({ email, password })
	});
	const cookie = res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
	if (res.status !== 303 || !cookie) throw new Error(`bench: sign-in as ${email} answered ${res.status}, no session cookie`);
	return cookie;
}

const pct = (sorted: number[], p: number) => (sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] : NaN);

type Pass = { byZoom: Map<number, number[]>; all: number[]; codes: Map<number, number>; seconds: number };

async function pass(paths: string[], cookie: string): Promise<Pass> {
	let next = 0;
	const byZoom = new Map<number, number[]>();
	const all: number[] = [];
	const codes = new Map<number, number>();
	const started = performance.now();
	const instance = autocannon({
		url: base,
		connections,
		amount: paths.length,
		headers: { cookie, 'accept-encoding': 'gzip' },
		requests: [
			{
				setupRequest: (req: Record<string, unknown>, context: Record<string, unknown>) => {
					const path = paths[next++ % paths.length];
					context.path = path;
					return { ...req, method: 'GET', path };
				}
			}
		]
	} as autocannon.Options);
	// With one request in flight per connection, the client's context still names the answered path.
	instance.on('response', (client: { requestIterator?: { context?: { path?: string } } }, status: number, _bytes: number, ms: number) => {
		const path = client.requestIterator?.context?.path ?? '';
		const z = Number(/tiles\/cells\/(\d+)\//.exec(path)?.[1] ?? -1);
		if (!byZoom.has(z)) byZoom.set(z, []);
		byZoom.get(z)!.push(ms);
		all.push(ms);
		codes.set(status, (codes.get(status) ?? 0) + 1);
	});
	await instance;
	for (const v of byZoom.values()) v.sort((a, b) => a - b);
	all.sort((a, b) => a - b);
	return { byZoom, all, codes, seconds: (performance.now() - started) / 1000 };
}

/** RSS of this process's Chromium descendants (the browser and its renderer, GPU and utility processes). */
function treeRssMb(pid: number): number {
	const children = new Map<number, number[]>();
	const rss = new Map<number, number>();
	for (const entry of readdirProc()) {
		try {
			const stat = readFileSync(`/proc/${entry}/stat`, 'utf8');
			const ppid = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
			const status = readFileSync(`/proc/${entry}/status`, 'utf8');
			const kb = Number(/VmRSS:\s+(\d+)/.exec(status)?.[1] ?? 0);
			const comm = readFileSync(`/proc/${entry}/comm`, 'utf8');
			rss.set(entry, comm.includes('chrom') ? kb : 0);
			if (!children.has(ppid)) children.set(ppid, []);
			children.get(ppid)!.push(entry);
		} catch {
			// The process ended while we read it.
		}
	}
	let total = 0;
	const stack = [pid];
	while (stack.length) {
		const p = stack.pop()!;
		total += rss.get(p) ?? 0;
		stack.push(...(children.get(p) ?? []));
	}
	return total / 1024;
}

function readdirProc(): number[] {
	return readdirSync('/proc').filter((d) => /^\d+$/.test(d)).map(Number);
}

/** A page with maplibre-gl and only the basemap, plus a proxy of /api/* to the app with the session. */
function bareServer(cookie: string, bounds: Bbox): Promise<{ url: string; close: () => void }> {
	const dist = join(root, 'node_modules/maplibre-gl/dist');
	const html = `<!doctype html><html><head><meta charset="utf-8"><link rel="stylesheet" href="/maplibre-gl.css">
<style>html,body,#map{margin:0;height:100%}</style></head><body><div id="map"></div>
<script type="module">
import * as maplibregl from '/maplibre-gl.mjs';
maplibregl.setWorkerUrl('/maplibre-gl-worker.mjs');
const map = new maplibregl.Map({ container: 'map', fadeDuration: 0, bounds: ${JSON.stringify([[bounds[0], bounds[1]], [bounds[2], bounds[3]]])},
  fitBoundsOptions: { padding: 24 },
  style: { version: 8, sources: { basemap: { type: 'vector', tiles: [location.origin + '/api/basemap/{z}/{x}/{y}'], maxzoom: 10, attribution: 'Natural Earth' } },
    layers: [ { id: 'bg', type: 'background', paint: { 'background-color': '#dfe8ec' } },
      { id: 'land', type: 'fill', source: 'basemap', 'source-layer': 'land', paint: { 'fill-color': '#f6f3ea' } },
      { id: 'borders', type: 'line', source: 'basemap', 'source-layer': 'borders', paint: { 'line-color': '#9a9184', 'line-dasharray': [2, 2] } } ] } });
map.once('idle', () => { window.__idleAt = performance.now(); });
</script></body></html>`;
	const files: Record<string, [string, string]> = {
		'/maplibre-gl.mjs': ['maplibre-gl.mjs', 'text/javascript'],
		'/maplibre-gl-worker.mjs': ['maplibre-gl-worker.mjs', 'text/javascript'],
		'/maplibre-gl-shared.mjs': ['maplibre-gl-shared.mjs', 'text/javascript'],
		'/maplibre-gl.css': ['maplibre-gl.css', 'text/css']
	};
	const app = new URL(base);
	const server = createServer((req, res) => {
		const path = (req.url ?? '/').split('?')[0];
		if (path === '/') {
			res.writeHead(200, { 'content-type': 'text/html' }).end(html);
		} else if (files[path]) {
			res.writeHead(200, { 'content-type': files[path][1] }).end(readFileSync(join(dist, files[path][0])));
		} else if (path.startsWith('/api/')) {
			const up = httpRequest({ host: app.hostname, port: app.port, path: req.url, headers: { cookie, 'accept-encoding': 'gzip' } }, (r) => {
				res.writeHead(r.statusCode ?? 502, r.headers);
				r.pipe(res);
			});
			up.on('error', () => res.writeHead(502).end());
			up.end();
		} else {
			res.writeHead(404).end();
		}
	});
	return new Promise((ok) => server.listen(0, '127.0.0.1', () => {
		const port = (server.address() as { port: number }).port;
		ok({ url: `http://127.0.0.1:${port}/`, close: () => server.close() });
	}));
}

async function browserRuns(cookie: string, bounds: Bbox) {
	const bare = await bareServer(cookie, bounds);
	const browser = await chromium.launch({
		executablePath: '/usr/bin/chromium',
		// The flags of playwright.config.ts: software WebGL works with exactly these (mapstack.md § 1).
		args: ['--no-sandbox', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic', '--enable-unsafe-swiftshader']
	});
	const pid = process.pid;
	const out: { bare: number[]; map: number[]; rssMb: number; mapNote: string } = { bare: [], map: [], rssMb: 0, mapNote: '' };
	try {
		const runs = Number(process.env.BENCH_BROWSER_RUNS ?? 3);
		for (let i = 0; i < runs; i++) {
			const ctx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
			const page = await ctx.newPage();
			const t0 = Date.now();
			await page.goto(bare.url);
			await page.waitForFunction(() => (window as unknown as { __idleAt?: number }).__idleAt !== undefined, null, { timeout: 60_000 });
			out.bare.push(Date.now() - t0);
			await ctx.close();

			const mctx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
			const [name, value] = cookie.split(';')[0].split('=');
			await mctx.addCookies([{ name, value, url: base }]);
			const mpage = await mctx.newPage();
			const t1 = Date.now();
			const res = await mpage.goto(`${base}/${farm}/map`);
			if (!res || res.status() !== 200) {
				out.mapNote = `/${farm}/map answered ${res?.status()}`;
				await mctx.close();
				break;
			}
			try {
				await mpage.waitForSelector('[data-map-idle="true"]', { timeout: 60_000 });
				out.map.push(Date.now() - t1);
			} catch {
				out.mapNote = 'the map page never marked itself idle (data-map-idle) within 60 s';
			}
			out.rssMb = Math.max(out.rssMb, treeRssMb(pid));
			await mctx.close();
		}
	} finally {
		await browser.close();
		bare.close();
	}
	return out;
}

const cookie = await signIn();
const metaRes = await fetch(`${base}/api/farms/${farm}/map/meta`, { headers: { cookie } });
if (!metaRes.ok) throw new Error(`bench: map meta answered ${metaRes.status}`);
const meta = (await metaRes.json()) as { seasons: number[]; bounds: Bbox | null };
if (!meta.bounds || meta.seasons.length === 0) throw new Error('bench: the farm has no fields or no seasons; load the demo farm first');
const season = meta.seasons[0];
const paths: string[] = [];
for (let z = 12; z <= 18; z++) for (const [, x, y] of tilesForBbox(meta.bounds, z)) paths.push(`/api/farms/${farm}/tiles/cells/${z}/${x}/${y}.pbf?season=${season}`);
console.log(`${paths.length} tiles over ${farm} (season ${season}), z12-z18, ${connections} connections`);

// The floor on this machine: the same load on a route that only checks the session.
const floor = await pass(paths.map(() => '/api/me'), cookie);
const cold = await pass(paths, cookie);
const warm = await pass(paths, cookie);
const row = (label: string, n: number, c: number[], w: number[]) =>
	`${label.padEnd(8)}${String(n).padStart(7)}${pct(c, 50).toFixed(1).padStart(10)}${pct(c, 95).toFixed(1).padStart(10)}${pct(w, 50).toFixed(1).padStart(10)}${pct(w, 95).toFixed(1).padStart(10)}`;
console.log(`\n${'zoom'.padEnd(8)}${'tiles'.padStart(7)}${'cold p50'.padStart(10)}${'cold p95'.padStart(10)}${'warm p50'.padStart(10)}${'warm p95'.padStart(10)}   (ms)`);
for (let z = 12; z <= 18; z++) {
	const c = cold.byZoom.get(z) ?? [];
	console.log(row(`z${z}`, c.length, c, warm.byZoom.get(z) ?? []));
}
console.log(row('all', cold.all.length, cold.all, warm.all));
console.log(`/api/me (session check only, same load): p50 ${pct(floor.all, 50).toFixed(1)} ms, p95 ${pct(floor.all, 95).toFixed(1)} ms; load average ${(await import('node:os')).loadavg().map((l) => l.toFixed(1)).join(' ')}`);
console.log(`status codes cold ${JSON.stringify(Object.fromEntries(cold.codes))}, warm ${JSON.stringify(Object.fromEntries(warm.codes))}; ${(paths.length / cold.seconds).toFixed(0)} tiles/s cold, ${(paths.length / warm.seconds).toFixed(0)} warm`);

if (process.env.BENCH_BROWSER !== 'off') {
	const b = await browserRuns(cookie, meta.bounds);
	const med = (v: number[]) => [...v].sort((a, c) => a - c)[Math.floor(v.length / 2)];
	console.log(`\nfirst idle (ms, median of ${b.bare.length}): bare basemap ${med(b.bare)} [${b.bare.join(', ')}]` + (b.map.length ? `, /${farm}/map ${med(b.map)} [${b.map.join(', ')}], ratio ${(med(b.map) / med(b.bare)).toFixed(2)} (target ≤ 1.5)` : `; map page not measured: ${b.mapNote}`));
	console.log(`browser RSS (whole process tree, peak): ${(b.rssMb / 1024).toFixed(2)} GB (target < 1.3 GB)`);
}
const p95 = pct(cold.all, 95);
console.log(`\ntile p95 cold ${p95.toFixed(1)} ms, warm ${pct(warm.all, 95).toFixed(1)} ms (target < 50 ms)`);

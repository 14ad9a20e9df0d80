// Season summaries against real rows in PostgreSQL: the figures equal the savings page's and the
// field trend's for the same field and season, the landlord's share is percent × cost, grants are
// saved and audited, the mail carries no figures, and the PDF (read back by pdfjs-dist, Mozilla's
// independent PDF reader) holds one page per visible field and never a field that is not granted.
import { beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import type { RequestEvent } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { applications, auditLog, fields, landlordGrants, products, tankMixProducts, tankMixes } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import { eventFor, join, makeFarm, makeUser, statusOf } from '$lib/server/testing/fixtures';
import { waitForMail, linksIn } from '$lib/server/testing/outbox';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import { report } from '$lib/server/savings';
import { fieldTrend } from '$lib/server/field-trend';
import { summaryFigures } from '$lib/summaries/summary-text';
import { fieldSummary, seasonSummaries, summarySeasons } from './season-summary';
import { listLandlords, saveGrants } from './grants';
import { emailSummary } from './email';
import { GET as pdfGet } from '../../../routes/(app)/[farm]/summaries/pdf/+server';
import { load as fieldPageLoad } from '../../../routes/(app)/[farm]/summaries/[field=uuid]/+page.server';

const HA = 1e4;
type Who = 'manager' | 'agronomist' | 'operator' | 'landlord' | 'cashLandlord';
let actors: Record<Who, Actor>;
let other: Actor;
const ids: Record<string, string> = {};
const square = (w: number, s: number) => ({ type: 'Polygon' as const, coordinates: [[[w, s], [w + 0.01, s], [w + 0.01, s + 0.01], [w, s + 0.01], [w, s]]] });

beforeAll(async () => {
	const farm = await makeFarm();
	const f = { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency };
	actors = {} as typeof actors;
	for (const role of ['manager', 'agronomist', 'operator', 'landlord', 'cashLandlord'] as const) {
		const u = await makeUser();
		const r = role === 'cashLandlord' ? 'landlord' : role;
		await join(farm.id, u.id, r);
		actors[role] = { user: { ...u, units: role === 'landlord' ? 'us' : 'metric' }, farm: f, role: r };
	}
	const field = async (name: string, w: number) => (await db.insert(fields).values({ farmId: farm.id, name, ...fieldGeometryColumns(square(w, 0)) }).returning())[0].id;
	ids.nf = await field('North Flat', 0);
	ids.cd = await field('Coyote Draw', 0.02);
	ids.sh = await field('Schoolhouse', 0.04);
	const product = async (name: string, unit: 'L' | 'kg', pricePerUnit: number | null) =>
		(await db.insert(products).values({ farmId: farm.id, name, unit, pricePerUnit }).returning())[0].id;
	ids.gly = await product('Glyphosate 540 (demo)', 'L', 6.4);
	ids.dic = await product('Dicamba 480 (demo)', 'L', 15.8);
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Fallow knockdown', carrierRateLPerM2: 100 / HA }).returning();
	await db.insert(tankMixProducts).values([
		{ tankMixId: mix.id, productId: ids.gly, ratePerM2: 1.5 / HA },
		{ tankMixId: mix.id, productId: ids.dic, ratePerM2: 0.3 / HA }
	]);
	const app = (fieldId: string, day: string, coveredHa: number, sprayedHa: number, volumeL: number) => ({
		farmId: farm.id, fieldId, tankMixId: mix.id, day, season: Number(day.slice(0, 4)),
		startedAt: new Date(`${day}T08:00:00Z`), endedAt: new Date(`${day}T10:00:00Z`), fixCount: 100,
		coveredM2: coveredHa * HA, sprayedM2: sprayedHa * HA, volumeL
	});
	await db.insert(applications).values([
		app(ids.nf, '2025-04-14', 100, 12, 1200),
		app(ids.cd, '2025-04-15', 50, 9, 900),
		app(ids.sh, '2025-04-16', 80, 4, 400),
		app(ids.nf, '2024-04-10', 100, 20, 2000)
	]);
	// The landlord: North Flat on a 33.3 % crop share. The other: Schoolhouse under cash rent.
	await db.insert(landlordGrants).values([
		{ farmId: farm.id, userId: actors.landlord.user.id, fieldId: ids.nf, cropSharePercent: 33.3 },
		{ farmId: farm.id, userId: actors.cashLandlord.user.id, fieldId: ids.sh, cropSharePercent: null }
	]);

	const farm2 = await makeFarm();
	const u2 = await makeUser();
	await join(farm2.id, u2.id, 'manager');
	other = { user: u2, farm: { id: farm2.id, slug: farm2.slug, name: farm2.name, currency: farm2.currency }, role: 'manager' };
	ids.elsewhere = (await db.insert(fields).values({ farmId: farm2.id, name: 'Elsewhere Quarter', ...fieldGeometryColumns(square(1, 1)) }).returning())[0].id;
});

const fieldRow = async (id: string) => (await db.select().from(fields).where(eq(fields.id, id)))[0];

describe('season summary figures', () => {
	it('equal the savings page’s rows for the same field and season, and the field trend’s shares', async () => {
		const s = await fieldSummary(actors.manager, await fieldRow(ids.nf), 2025);
		const savings = await report(actors.manager, { season: 2025, fieldId: ids.nf });
		expect(s.products).toEqual(savings.rows);
		expect(s.herbicideCost).toBeCloseTo(savings.totals.appliedCost, 9);
		expect(s.savedCost).toBeCloseTo(savings.totals.savedCost, 9);
		const trend = (await fieldTrend(actors.manager, { id: ids.nf })).seasons.find((t) => t.season === 2025)!;
		expect(s.sprayedPercent).toBe(trend.sprayedPercent);
		expect(s.savedPercent).toBe(trend.savedPercent);
		// By hand: 1,200 of 10,000 L broadcast-equivalent liquid -> 18 L glyphosate (x 6.40 = 115.20)
		// and 3.6 L dicamba (x 15.80 = 56.88): 172.08 of herbicide; 88 % saved; 12 of 100 ha sprayed.
		expect(s.herbicideCost).toBeCloseTo(172.08, 9);
		expect(s.savedPercent).toBeCloseTo(88, 9);
		expect(s.percentOfField).toBeCloseTo((100 * 12 * HA) / s.field.areaM2, 9);
	});

	it('the landlord’s share is the crop share times the herbicide cost; cash rent has none', async () => {
		const s = await fieldSummary(actors.manager, await fieldRow(ids.nf), 2025);
		expect(s.leases).toHaveLength(1);
		expect(s.leases[0].lease).toEqual({ kind: 'crop-share', percent: 33.3 });
		expect(s.leases[0].share).toBeCloseTo(0.333 * s.herbicideCost!, 9);
		expect(s.leases[0].share).toBeCloseTo(57.30264, 9); // 33.3 % of 172.08, by hand
		const cash = await fieldSummary(actors.manager, await fieldRow(ids.sh), 2025);
		expect(cash.leases[0]).toMatchObject({ lease: { kind: 'cash-rent' }, share: null });
	});

	it('the landlord sees the same figures, only their own lease, only granted fields and seasons', async () => {
		const mine = await fieldSummary(actors.landlord, await fieldRow(ids.nf), 2025);
		const managers = await fieldSummary(actors.manager, await fieldRow(ids.nf), 2025);
		expect(mine.products).toEqual(managers.products);
		expect(mine.herbicideCost).toBe(managers.herbicideCost);
		expect(mine.leases.map((l) => l.userId)).toEqual([actors.landlord.user.id]);
		expect((await seasonSummaries(actors.landlord, 2025)).map((s) => s.field.name)).toEqual(['North Flat']);
		expect((await seasonSummaries(actors.manager, 2025)).map((s) => s.field.name)).toEqual(['Coyote Draw', 'North Flat', 'Schoolhouse']);
		expect(await summarySeasons(actors.cashLandlord)).toEqual([2025]);
		expect(await summarySeasons(actors.landlord)).toEqual([2025, 2024]);
	});

	it('the field summary page: 404 for a field not granted or in another farm; 403 for operators and agronomists', async () => {
		const page = (actor: Actor, fieldId: string) =>
			Promise.resolve(fieldPageLoad(eventFor(actor.user, { farm: actor.farm.slug, field: fieldId }, `/${actor.farm.slug}/summaries/${fieldId}?season=2025`) as never));
		expect(await statusOf(page(actors.landlord, ids.nf))).toBe(200);
		expect(await statusOf(page(actors.landlord, ids.cd))).toBe(404);
		expect(await statusOf(page(actors.landlord, ids.elsewhere))).toBe(404);
		expect(await statusOf(page(actors.manager, ids.elsewhere))).toBe(404);
		expect(await statusOf(page(actors.operator, ids.nf))).toBe(403);
		expect(await statusOf(page(actors.agronomist, ids.nf))).toBe(403);
	});
});

describe('grants', () => {
	it('saves grants, changes and revokes, each audited with the field’s name and share', async () => {
		const since = new Date(Date.now() - 1000);
		const landlordId = actors.cashLandlord.user.id;
		const first = await saveGrants(actors.manager, landlordId, [
			{ fieldId: ids.sh, cropSharePercent: 25 },
			{ fieldId: ids.cd, cropSharePercent: null }
		]);
		expect(first).toEqual({ created: [{ fieldId: ids.cd, cropSharePercent: null }], changed: [{ fieldId: ids.sh, from: null, to: 25 }], revoked: [] });
		const second = await saveGrants(actors.manager, landlordId, [{ fieldId: ids.cd, cropSharePercent: null }]);
		expect(second?.revoked).toEqual([{ fieldId: ids.sh, cropSharePercent: 25 }]);
		const stored = await db.select().from(landlordGrants).where(eq(landlordGrants.userId, landlordId));
		expect(stored.map((g) => [g.fieldId, g.cropSharePercent])).toEqual([[ids.cd, null]]);
		const audit = await db.select().from(auditLog).where(and(eq(auditLog.farmId, actors.manager.farm.id), eq(auditLog.targetId, landlordId)));
		const entries = audit.filter((a) => a.at > since).map((a) => [a.action, (a.detail as Record<string, unknown>).field]);
		expect(entries.sort()).toEqual([['grant.changed', 'Schoolhouse'], ['grant.created', 'Coyote Draw'], ['grant.revoked', 'Schoolhouse']].sort());
		const changed = audit.find((a) => a.action === 'grant.changed')!.detail as Record<string, unknown>;
		expect(changed).toMatchObject({ cropSharePercentFrom: null, cropSharePercentTo: 25 });
		// Put things back for the other tests.
		await saveGrants(actors.manager, landlordId, [{ fieldId: ids.sh, cropSharePercent: null }]);
	});

	it('only managers; someone who is not a landlord of this farm is not found', async () => {
		for (const who of ['agronomist', 'operator', 'landlord'] as const) {
			expect(await statusOf(saveGrants(actors[who], actors.landlord.user.id, []))).toBe(403);
			expect(await statusOf(listLandlords(actors[who]))).toBe(403);
		}
		expect(await saveGrants(actors.manager, actors.operator.user.id, [])).toBeNull();
		expect(await saveGrants(other, actors.landlord.user.id, [])).toBeNull();
		expect((await listLandlords(actors.manager)).map((l) => l.userId).sort()).toEqual([actors.landlord.user.id, actors.cashLandlord.user.id].sort());
	});
});

describe('the summary mail', () => {
	it('links to the summaries behind sign-in, names the fields and holds no figures', async () => {
		const since = new Date(Date.now() - 1000);
		const sent = await emailSummary(actors.manager, actors.landlord.user.id, 2025);
		expect(sent?.ok).toBe(true);
		const mail = await waitForMail(actors.landlord.user.email, { since, kind: 'landlord-summary' });
		expect(mail.farmId).toBe(actors.manager.farm.id);
		const url = `${process.env.ORIGIN}/${actors.manager.farm.slug}/summaries?season=2025`;
		expect(linksIn(mail.textBody)).toEqual([url]);
		expect(mail.textBody).toContain('North Flat');
		const s = await fieldSummary(actors.landlord, await fieldRow(ids.nf), 2025);
		for (const f of summaryFigures(s, 'us', 'USD')) if (/\d\D+\d|[%$]|\d \w/.test(f.value)) expect(mail.textBody, f.label).not.toContain(f.value);
		for (const body of [mail.textBody!, mail.htmlBody!]) {
			// The fixtures' names hold digits (User u-…, Farm farm-…): take them out first.
			const names = [url, actors.landlord.user.name, actors.manager.user.name, actors.manager.farm.name];
			const rest = names.reduce((b, n) => b.replaceAll(n, ''), body).replace(/<[^>]+>/g, ' ');
			const numbers = rest.match(/\d[\d.,]*/g) ?? [];
			expect(numbers.every((n) => n === '2025')).toBe(true);
			expect(body).not.toContain('Coyote Draw');
			expect(body).not.toMatch(/\$|%/);
		}
		const [audit] = await db.select().from(auditLog).where(and(eq(auditLog.action, 'summary.emailed'), eq(auditLog.targetId, actors.landlord.user.id)));
		expect(audit.detail).toMatchObject({ season: 2025, sent: true, fields: ['North Flat'] });
		expect(await statusOf(emailSummary(actors.landlord, actors.landlord.user.id, 2025))).toBe(403);
	});
});

async function pdfText(actor: Actor, query: string) {
	const event = eventFor(actor.user, { farm: actor.farm.slug }, `/${actor.farm.slug}/summaries/pdf?${query}`) as RequestEvent;
	const res = await pdfGet(event as never);
	expect(res.headers.get('content-type')).toBe('application/pdf');
	expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="season-summary-.+\.pdf"$/);
	const bytes = new Uint8Array(await res.arrayBuffer());
	// SUMMARY_PDF_OUT=/tmp/x keeps a copy to look at (pdfjs takes the bytes over).
	if (process.env.SUMMARY_PDF_OUT) (await import('node:fs')).writeFileSync(`${process.env.SUMMARY_PDF_OUT}-${actor.role}.pdf`, bytes);
	const pdfjs = await import('pdfjs-dist/legacy/build/pdf.mjs');
	const pdf = await pdfjs.getDocument({ data: bytes, useSystemFonts: false }).promise;
	const pages: string[] = [];
	for (let i = 1; i <= pdf.numPages; i++) {
		const content = await (await pdf.getPage(i)).getTextContent();
		pages.push(content.items.map((x) => ('str' in x ? x.str : '')).join(''));
	}
	return pages;
}

describe('the PDF', () => {
	it('has one page per field the manager sees, each with its name and figures', async () => {
		const pages = await pdfText(actors.manager, 'season=2025');
		const summaries = await seasonSummaries(actors.manager, 2025);
		expect(pages).toHaveLength(summaries.length);
		summaries.forEach((s, i) => {
			expect(pages[i]).toContain(s.field.name);
			for (const f of summaryFigures(s, 'metric', 'USD')) expect(pages[i], `${s.field.name} ${f.label}`).toContain(f.value);
		});
		expect(pages[1]).toContain('33.3 % crop share');
		expect(pages[2]).toContain('No share under cash rent');
	});

	it('for a landlord holds only the granted field, in their units, never another field’s name', async () => {
		const pages = await pdfText(actors.landlord, 'season=2025');
		expect(pages).toHaveLength(1);
		expect(pages[0]).toContain('North Flat');
		expect(pages[0]).toMatch(/\d ac/); // US units: acres
		expect(pages[0]).toContain('33 ft a side'); // 10 m cells, in feet
		const s = await fieldSummary(actors.landlord, await fieldRow(ids.nf), 2025);
		expect(pages[0]).toContain('$57.30'); // 33.3 % of $172.08
		for (const f of summaryFigures(s, 'us', 'USD')) expect(pages[0]).toContain(f.value);
		for (const name of ['Coyote Draw', 'Schoolhouse', 'Elsewhere Quarter']) expect(pages.join(' ')).not.toContain(name);
	});

	it('one field by id; a field not granted or of another farm is 404; operators 403', async () => {
		expect(await pdfText(actors.landlord, `season=2025&field=${ids.nf}`)).toHaveLength(1);
		const status = (actor: Actor, q: string) => statusOf(Promise.resolve(pdfGet(eventFor(actor.user, { farm: actor.farm.slug }, `/${actor.farm.slug}/summaries/pdf?${q}`) as never)));
		expect(await status(actors.landlord, `season=2025&field=${ids.cd}`)).toBe(404);
		expect(await status(actors.landlord, `season=2025&field=${ids.elsewhere}`)).toBe(404);
		expect(await status(actors.manager, `season=2025&field=${ids.elsewhere}`)).toBe(404);
		expect(await status(actors.operator, 'season=2025')).toBe(403);
		expect(await status(actors.agronomist, 'season=2025')).toBe(403);
	});
});

// The field page year over year on the demo farm: the chart draws the API's figures, the hotspot
// pairs table holds the map's comparison, one small map per season in the map's ramp, and the page
// prints on white with the charts inside the page.
import { expect, test, type Locator, type Page } from '@playwright/test';
import { colourAt, shareStops, statusKinds } from '../../src/lib/map/ramps';
import { people, signIn } from './helpers';

const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };
type Trend = {
	seasons: { season: number; sprayedPercent: number; savedPercent: number; hotspotAreaM2: number }[];
	pairs: { earlier: number; later: number; persistentAreaM2: number; newAreaM2: number; clearedAreaM2: number }[];
};

const hex = (h: string): [number, number, number] => [1, 3, 5].map((i) => parseInt(h.slice(i, i + 2), 16)) as [number, number, number];

/** How many pixels of a screenshot of `target` are within 12 (sum of channel differences) of each colour. */
async function countColours(page: Page, target: Locator, colours: [number, number, number][]) {
	const png = (await target.screenshot()).toString('base64');
	return page.evaluate(
		async ({ png, colours }) => {
			const img = new Image();
			img.src = `data:image/png;base64,${png}`;
			await img.decode();
			const canvas = document.createElement('canvas');
			canvas.width = img.width;
			canvas.height = img.height;
			const ctx = canvas.getContext('2d')!;
			ctx.drawImage(img, 0, 0);
			const d = ctx.getImageData(0, 0, img.width, img.height).data;
			const counts = colours.map(() => 0);
			for (let o = 0; o < d.length; o += 4)
				colours.forEach(([r, g, b], k) => {
					if (Math.abs(d[o] - r) + Math.abs(d[o + 1] - g) + Math.abs(d[o + 2] - b) <= 12) counts[k]++;
				});
			return counts;
		},
		{ png, colours }
	);
}

async function openField(page: Page, name: string) {
	await page.goto('/tallowgrass/fields');
	await page.getByRole('link', { name }).click();
	await expect(page.getByTestId('trend-chart')).toHaveAttribute('data-drawn', 'true', { timeout: 20_000 });
	return page.url().split('/').pop()!;
}

test('Coyote Draw: the charts draw the API figures; hotspots per season pair; one small map per season', async ({ page }) => {
	await page.setViewportSize(viewports.desktop);
	await signIn(page, people.manager);
	const id = await openField(page, 'Coyote Draw');
	const trend = (await (await page.request.get(`/api/farms/tallowgrass/fields/${id}/trend`)).json()) as Trend;
	expect(trend.seasons.map((s) => s.season)).toEqual([2024, 2025, 2026]);

	// The chart's data are the API's (which the vitest suite checks against the stored rows).
	const canvas = page.getByTestId('trend-chart').locator('canvas');
	expect(JSON.parse((await canvas.getAttribute('data-sprayed'))!)).toEqual(trend.seasons.map((s) => s.sprayedPercent));
	expect(JSON.parse((await canvas.getAttribute('data-saved'))!)).toEqual(trend.seasons.map((s) => s.savedPercent));
	// Spot spraying saved most of the product in every season of the demo.
	for (const s of trend.seasons) expect(s.savedPercent).toBeGreaterThan(50);

	// The bars are on the canvas in the two series' colours.
	const [sprayed, saved] = await countColours(page, canvas, [hex(shareStops[4][1]), hex('#3f6f79')]);
	expect(sprayed).toBeGreaterThan(200);
	expect(saved).toBeGreaterThan(2000);

	// The hotspot chart's colours are the map's status colours, and the table its areas.
	const hotCounts = await countColours(page, page.getByTestId('hotspot-chart').locator('canvas'), statusKinds.map((k) => hex(k.colour)));
	expect(hotCounts.every((n) => n > 50), `persistent/new/cleared bars: ${hotCounts}`).toBe(true);
	for (const p of trend.pairs) {
		const row = page.locator(`[data-testid="pairs-table"] tr[data-pair="${p.earlier}-${p.later}"]`);
		for (const k of statusKinds) {
			expect(Number(await row.locator(`td[data-status="${k.key}"]`).getAttribute('data-area-m2'))).toBeCloseTo(p[`${k.key}AreaM2`], 6);
		}
	}
	// The demo's story: Coyote Draw's draw hotspot grows into 2025 and is cleared in 2026.
	const [p2425, p2526] = trend.pairs;
	expect(p2425.newAreaM2).toBeGreaterThan(p2425.clearedAreaM2);
	expect(p2526.clearedAreaM2).toBeGreaterThan(p2526.newAreaM2);

	// Small multiples: one SVG per season, coloured in the map's ramp, and different seasons differ.
	const maps = page.getByTestId('small-multiple');
	await expect(maps).toHaveCount(3);
	const ramp = [10, 20, 35, 50, 75].map((v) => colourAt(shareStops, v));
	const perSeason = [];
	for (let i = 0; i < 3; i++) perSeason.push(await countColours(page, maps.nth(i), ramp));
	for (const counts of perSeason) expect(counts.reduce((a, b) => a + b, 0)).toBeGreaterThan(100);
	expect(perSeason[1]).not.toEqual(perSeason[2]);
	// From the top, so the sticky header is not photographed halfway down the page.
	await page.evaluate(() => window.scrollTo(0, 0));
	await page.screenshot({ path: 'tests/screenshots/field-trend-desktop.png', fullPage: true });
});

test('the field page prints on white, charts and tables inside the page', async ({ page }) => {
	await page.setViewportSize(viewports.desktop);
	await signIn(page, people.agronomist);
	await openField(page, 'Long Hill');
	await page.emulateMedia({ media: 'print' });
	// What printing does: the page narrows to the paper (A4 at 12 mm margins, about 700 CSS px).
	await page.setViewportSize({ width: 700, height: 1000 });
	await page.evaluate(() => window.dispatchEvent(new Event('beforeprint')));
	await expect(page.locator('header').first()).toBeHidden();
	await expect(page.getByRole('navigation', { name: 'Farm' })).toBeHidden();
	expect(await page.evaluate(() => getComputedStyle(document.body).backgroundColor)).toBe('rgb(255, 255, 255)');
	for (const id of ['trend-chart', 'hotspot-chart', 'small-multiples', 'trend-table', 'pairs-table', 'season-figures', 'field-applications']) {
		const box = (await page.getByTestId(id).boundingBox())!;
		expect(box.x, id).toBeGreaterThanOrEqual(0);
		expect(box.x + box.width, id).toBeLessThanOrEqual(700);
	}
	const canvasBox = (await page.getByTestId('trend-chart').locator('canvas').boundingBox())!;
	expect(canvasBox.width).toBeLessThanOrEqual(700);
	// No dark backgrounds: nothing on the page is painted darker than the palette's light tints.
	const dark = await page.evaluate(() =>
		[...document.querySelectorAll('body *')]
			.filter((el) => (el as HTMLElement).offsetParent !== null)
			.map((el) => getComputedStyle(el).backgroundColor)
			.filter((c) => {
				const m = c.match(/\d+(\.\d+)?/g)?.map(Number);
				if (!m || (m.length === 4 && m[3] === 0)) return false;
				return 0.2126 * m[0] + 0.7152 * m[1] + 0.0722 * m[2] < 128;
			})
	);
	// The only dark fills allowed in print are small swatches (legend, buttons hidden in print).
	expect(dark.length).toBeLessThanOrEqual(12);
	await page.screenshot({ path: 'tests/screenshots/field-trend-print.png', fullPage: true });
	const pdf = await page.pdf({ format: 'A4', printBackground: false });
	expect(pdf.length).toBeGreaterThan(10_000);
});

test('the year over year on a phone', async ({ page }) => {
	await page.setViewportSize(viewports.phone);
	await signIn(page, people.operator);
	await openField(page, 'Wetland Quarter');
	await expect(page.getByTestId('small-multiple')).toHaveCount(3);
	const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
	expect(overflow).toBeLessThanOrEqual(0);
	// Operators see no money.
	await expect(page.getByTestId('trend-table')).not.toContainText('$');
	await page.screenshot({ path: 'tests/screenshots/field-trend-phone.png', fullPage: true });
});

import { readFileSync } from 'node:fs';
import { expect, test, type Page } from '@playwright/test';
import { colourAt, shareStops } from '../../src/lib/map/ramps';
import { people, signIn } from './helpers';

const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };
const mapEl = (page: Page) => page.locator('[data-testid="map"]');

/** Waits until the cells of `query` (a prefix of the tile query) have been drawn and the map is idle. */
async function drawn(page: Page, query: string) {
	await expect(page.locator(`[data-testid="map-page"][data-rendered-query^="${query}"]`)).toBeAttached({ timeout: 40_000 });
	await expect(page.locator('[data-testid="map"][data-map-idle="true"]')).toBeAttached({ timeout: 40_000 });
}

async function openMap(page: Page, who: string = people.manager) {
	await signIn(page, who);
	await page.goto('/tallowgrass/map');
	await expect(page.locator('[data-testid="map"][data-map-ready="true"]')).toBeAttached({ timeout: 30_000 });
	await expect(page.locator('[data-testid="map-figures"][data-query]')).toBeAttached({ timeout: 30_000 });
}

async function showField(page: Page, name: string) {
	await page.getByRole('button', { name: `Show ${name} on the map` }).click();
	// fitBounds moves the map; wait for the move and the tiles it asks for.
	await page.waitForTimeout(50);
	await expect(page.locator('[data-testid="map"][data-map-idle="true"]')).toBeAttached({ timeout: 40_000 });
}

// The ramp's colours for 5-100 % (below 5 % the straw is too close to the paper to tell apart).
const palette = Array.from({ length: 96 }, (_, i) => colourAt(shareStops, 5 + i));

type Pixels = { width: number; height: number; ramp: number; classes: number[]; darkest: [number, number] | null };

/** Decodes a screenshot of the map in the page and classifies every pixel against the ramp. */
async function rampPixels(page: Page): Promise<Pixels> {
	const png = (await mapEl(page).screenshot()).toString('base64');
	return page.evaluate(
		async ({ png, palette }) => {
			const img = new Image();
			img.src = `data:image/png;base64,${png}`;
			await img.decode();
			const canvas = document.createElement('canvas');
			canvas.width = img.width;
			canvas.height = img.height;
			const ctx = canvas.getContext('2d')!;
			ctx.drawImage(img, 0, 0);
			const d = ctx.getImageData(0, 0, img.width, img.height).data;
			let ramp = 0;
			let darkest: [number, number] | null = null;
			let darkestIndex = -1;
			const classes: number[] = [];
			for (let y = 0; y < img.height; y++)
				for (let x = 0; x < img.width; x++) {
					const o = (y * img.width + x) * 4;
					let best = -1;
					for (let k = 0; k < palette.length; k++) {
						const [r, g, b] = palette[k];
						if (Math.abs(d[o] - r) + Math.abs(d[o + 1] - g) + Math.abs(d[o + 2] - b) <= 12) {
							best = k;
							break;
						}
					}
					if (best >= 0) ramp++;
					// A well-inside pixel of a dark cell, to click on (away from the edges and the legend).
					if (best > darkestIndex && x > img.width * 0.4 && y > 80 && y < img.height - 80) {
						darkestIndex = best;
						darkest = [x, y];
					}
					if (x % 4 === 0 && y % 4 === 0) classes.push(best >= 0 ? Math.floor(best / 10) : -1);
				}
			return { width: img.width, height: img.height, ramp, classes, darkest };
		},
		{ png, palette }
	);
}

test.describe.configure({ mode: 'serial' });

test('cells of the hot fields show the ramp, another season draws differently; desktop screenshot', async ({ page }) => {
	test.setTimeout(180_000);
	await page.setViewportSize(viewports.desktop);
	await openMap(page);
	const seasons = await page.getByTestId('season-select').locator('option').allTextContents();
	expect(seasons.length).toBeGreaterThanOrEqual(2);
	await drawn(page, `season=${seasons[0]}`);

	// Farm view first: the map is not blank (fields and cells drawn over the paper).
	const farm = await rampPixels(page);
	expect(farm.ramp).toBeGreaterThan(200);
	await page.screenshot({ path: 'tests/screenshots/map-farm-desktop.png' });

	await showField(page, 'Little Draw');
	const latest = await rampPixels(page);
	// Little Draw is the demo's weediest field (about 25 % treated share, sample-data/README.md):
	// thousands of pixels in straw-to-bark colours.
	expect(latest.ramp).toBeGreaterThan(2000);
	await page.screenshot({ path: 'tests/screenshots/map-desktop.png' });

	await page.getByTestId('season-select').selectOption(seasons[1]);
	await drawn(page, `season=${seasons[1]}`);
	const earlier = await rampPixels(page);
	expect(earlier.ramp).toBeGreaterThan(500);
	const differ = latest.classes.filter((c, i) => c !== earlier.classes[i]).length;
	expect(differ / latest.classes.length).toBeGreaterThan(0.01);
});

test('compare mode counts persistent, new and cleared hotspots', async ({ page }) => {
	test.setTimeout(120_000);
	await page.setViewportSize(viewports.desktop);
	await openMap(page);
	// One application: its own cells only, fewer than the whole season's.
	const seasonCells = Number(await page.getByTestId('cell-count').getAttribute('data-count'));
	await page.getByRole('button', { name: 'Application', exact: true }).click();
	await expect(page.getByTestId('map-figures')).toHaveAttribute('data-query', /^application=/);
	await drawn(page, 'application=');
	const applicationCells = Number(await page.getByTestId('cell-count').getAttribute('data-count'));
	expect(applicationCells).toBeGreaterThan(0);
	expect(applicationCells).toBeLessThan(seasonCells);

	await page.getByRole('button', { name: 'Compare', exact: true }).click();
	const table = page.getByTestId('compare-counts');
	await expect(table).toBeVisible({ timeout: 20_000 });
	const counts: number[] = [];
	for (const status of ['persistent', 'new', 'cleared']) {
		counts.push(Number(await table.locator(`tr[data-status="${status}"] td`).nth(1).getAttribute('data-count')));
	}
	expect(counts.every((n) => Number.isInteger(n) && n >= 0)).toBe(true);
	expect(counts.reduce((a, b) => a + b)).toBeGreaterThan(0);
	await drawn(page, 'compare=');
	await page.getByLabel('Hotspot status').check();
	await expect(page.getByTestId('map-legend').first()).toContainText('Persistent');
	await showField(page, 'Little Draw');
	await page.screenshot({ path: 'tests/screenshots/map-compare-desktop.png' });
});

test('the threshold previews live, is saved by a manager, and is read-only for an operator', async ({ page }) => {
	test.setTimeout(120_000);
	await page.setViewportSize(viewports.desktop);
	await openMap(page);
	const figures = page.getByTestId('map-figures');
	const saved = (await page.getByTestId('threshold-value').textContent())!.trim();
	const before = Number(await page.getByTestId('hotspot-count').getAttribute('data-count'));
	await page.getByTestId('threshold-slider').fill('5');
	await expect(figures).toHaveAttribute('data-query', /threshold=5$/);
	const lower = Number(await page.getByTestId('hotspot-count').getAttribute('data-count'));
	// A lower threshold can only add hotspots; the demo has cells between 5 % and the saved 20 %.
	expect(lower).toBeGreaterThan(before);
	await page.getByRole('button', { name: 'Save 5 %' }).click();
	await expect(page.getByText('Threshold saved.')).toBeVisible();
	await page.reload();
	await expect(page.getByTestId('threshold-value')).toHaveText('5 %');
	// Put it back for the other tests.
	await page.getByTestId('threshold-slider').fill(saved.replace(' %', ''));
	await page.getByRole('button', { name: `Save ${saved}` }).click();
	await expect(page.getByText('Threshold saved.')).toBeVisible();

	await page.context().clearCookies();
	await openMap(page, people.operator);
	await expect(page.getByTestId('threshold-slider')).toHaveCount(0);
	await expect(page.getByTestId('threshold-value')).toHaveText(saved);
	const refused = await page.request.post('/tallowgrass/map?/threshold', {
		form: { threshold: '3' },
		headers: { origin: new URL(page.url()).origin }
	});
	expect(refused.status()).toBe(403);
});

test('a landlord has no map', async ({ page }) => {
	await signIn(page, people.landlord);
	const response = await page.goto('/tallowgrass/map');
	expect(response?.status()).toBe(403);
	await page.goto('/tallowgrass/summaries');
	await expect(page.getByRole('navigation', { name: 'Farm' }).getByRole('link', { name: 'Map' })).toHaveCount(0);
});

test('clicking a cell shows its history; the view saves as a PNG', async ({ page }) => {
	test.setTimeout(120_000);
	await page.setViewportSize(viewports.desktop);
	await openMap(page);
	await drawn(page, 'season=');
	await showField(page, 'Little Draw');
	const pixels = await rampPixels(page);
	expect(pixels.darkest).not.toBeNull();
	await mapEl(page).click({ position: { x: pixels.darkest![0], y: pixels.darkest![1] } });
	const details = page.getByTestId('cell-details');
	await expect(details).toBeVisible();
	await expect(details).toContainText('Little Draw');
	const rows = page.getByTestId('cell-history').locator('tbody tr');
	await expect(rows.first()).toContainText(/20\d\d/);
	expect(await rows.count()).toBeGreaterThanOrEqual(1);
	await page.screenshot({ path: 'tests/screenshots/map-cell-desktop.png' });

	const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-png').click()]);
	expect(download.suggestedFilename()).toMatch(/^tallowgrass-map-season-\d{4}\.png$/);
	const file = readFileSync((await download.path())!);
	// PNG signature and IHDR (ISO/IEC 15948, W3C PNG spec §5.2, §11.2.2).
	expect([...file.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
	const width = file.readUInt32BE(16), height = file.readUInt32BE(20);
	expect(width).toBe(pixels.width);
	expect(height).toBeGreaterThan(pixels.height); // the key is drawn under the map
	expect(file.length).toBeGreaterThan(20_000);
	await download.saveAs('tests/screenshots/map-export.png');

	// Keyboard: focus the map and press Enter to pick what is under its centre.
	await page.getByRole('button', { name: 'Close the cell details' }).click();
	await page.locator('.maplibregl-canvas').focus();
	await page.keyboard.press('Enter');
	await expect(page.getByTestId('cell-details').or(page.getByTestId('field-details'))).toBeVisible();
});

test('phone: the map fills the screen and the sheet opens and closes', async ({ page }) => {
	test.setTimeout(120_000);
	await page.setViewportSize(viewports.phone);
	await openMap(page);
	await drawn(page, 'season=');
	const box = (await mapEl(page).boundingBox())!;
	expect(box.width).toBeGreaterThanOrEqual(380);
	expect(box.height).toBeGreaterThan(500);
	const toggle = page.getByRole('button', { name: /the panel/ });
	await expect(toggle).toHaveAttribute('aria-expanded', 'false');
	await page.screenshot({ path: 'tests/screenshots/map-phone.png' });
	await toggle.click();
	await expect(toggle).toHaveAttribute('aria-expanded', 'true');
	await expect(page.getByTestId('hotspot-count')).toBeVisible();
	await page.screenshot({ path: 'tests/screenshots/map-phone-sheet.png' });
	await page.getByRole('button', { name: 'Show Little Draw on the map' }).click();
	await toggle.click();
	await expect(toggle).toHaveAttribute('aria-expanded', 'false');
});

test("the panel's downloads give the season's hotspots as CSV", async ({ page }) => {
	await page.setViewportSize(viewports.desktop);
	await openMap(page, people.agronomist);
	await page.getByTestId('map-exports').locator('summary').click();
	const row = page.getByTestId('map-exports').getByRole('row', { name: /^Hotspots/ });
	const [download] = await Promise.all([page.waitForEvent('download'), row.getByRole('link', { name: 'CSV' }).click()]);
	expect(download.suggestedFilename()).toBe('tallowgrass-2026-hotspots.csv');
	const text = readFileSync(await download.path(), 'utf8');
	const lines = text.trimEnd().split('\r\n');
	expect(lines.length).toBeGreaterThan(10);
	// Every row a hotspot.
	const hotspotColumn = lines[0].split(',').indexOf('hotspot');
	expect(lines.slice(1).every((l) => l.split(',').at(hotspotColumn - lines[0].split(',').length) === '1')).toBe(true);
	await page.getByTestId('map-exports').screenshot({ path: 'tests/screenshots/map-exports-desktop.png' });
});

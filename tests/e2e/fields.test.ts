// Fields end to end: import a boundary file, draw, rename, delete, and what other roles may do.
// All boundaries here are invented rectangles near the invented demo farm.
import { expect, test, type Page } from '@playwright/test';
import { people, signIn } from './helpers';

const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };

type Ring = number[][];
const rect = (west: number, south: number, east: number, north: number): Ring => [
	[west, south], [east, south], [east, north], [west, north], [west, south]
];

// Area of a lat/lng quadrangle on the WGS84 ellipsoid (Snyder 1987, Map Projections: A Working
// Manual, eq. 3-12 for the authalic q). Edges along parallels differ from geodesic edges by a few
// m2 at this size, far below the 0.01 ha shown.
const a = 6378137;
const e = Math.sqrt((2 - 1 / 298.257223563) / 298.257223563);
const q = (latDeg: number) => {
	const s = Math.sin((latDeg * Math.PI) / 180);
	return (1 - e * e) * (s / (1 - e * e * s * s) - (1 / (2 * e)) * Math.log((1 - e * s) / (1 + e * s)));
};
const quadM2 = (west: number, south: number, east: number, north: number) => ((a * a) / 2) * (((east - west) * Math.PI) / 180) * (q(north) - q(south));
const ha = (m2: number) => `${(m2 / 1e4).toFixed(2)} ha`;

const holeFieldM2 = quadM2(-118.26, 47.1, -118.25, 47.105) - quadM2(-118.257, 47.102, -118.255, 47.103);
const twoPartM2 = quadM2(-118.245, 47.1, -118.24, 47.104) + quadM2(-118.238, 47.1, -118.235, 47.104);

const threeFields = {
	type: 'FeatureCollection',
	features: [
		{
			type: 'Feature',
			properties: { label: 'Invented Pond Paddock', code: 'T-1' },
			geometry: { type: 'Polygon', coordinates: [rect(-118.26, 47.1, -118.25, 47.105), rect(-118.257, 47.102, -118.255, 47.103).reverse()] }
		},
		{
			type: 'Feature',
			properties: { label: 'Invented Split Block', code: 'T-2' },
			geometry: { type: 'MultiPolygon', coordinates: [[rect(-118.245, 47.1, -118.24, 47.104)], [rect(-118.238, 47.1, -118.235, 47.104)]] }
		},
		{
			type: 'Feature',
			properties: { label: 'Invented Leave Out', code: 'T-3' },
			geometry: { type: 'Polygon', coordinates: [rect(-118.23, 47.1, -118.225, 47.104)] }
		}
	]
};

async function mapIdle(page: Page) {
	await expect(page.locator('[data-testid="map"][data-map-idle="true"]').first()).toBeVisible({ timeout: 30_000 });
}

test.describe.configure({ mode: 'serial' });

test('a manager imports three shapes, names them from an attribute, leaves one out and saves two', async ({ page }) => {
	const offsite: string[] = [];
	page.on('request', (r) => {
		if (!r.url().startsWith('http://127.0.0.1') && !r.url().startsWith('data:') && !r.url().startsWith('blob:')) offsite.push(r.url());
	});
	await page.setViewportSize(viewports.desktop);
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/fields');
	await page.getByRole('link', { name: 'Import boundaries' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'Import boundaries' })).toBeVisible();

	await page.getByLabel('Boundary file').setInputFiles({ name: 'invented-three.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify(threeFields)) });
	await page.getByRole('button', { name: 'Preview' }).click();
	const rows = page.getByTestId('import-feature');
	await expect(rows).toHaveCount(3);
	await mapIdle(page);

	await page.getByLabel('Name the fields from').selectOption('code');
	await expect(page.getByLabel('Name of shape 1')).toHaveValue('T-1');
	await page.getByLabel('Name the fields from').selectOption('label');
	await expect(page.getByLabel('Name of shape 1')).toHaveValue('Invented Pond Paddock');
	await expect(page.getByLabel('Name of shape 2')).toHaveValue('Invented Split Block');
	await expect(rows.nth(0)).toContainText(ha(holeFieldM2));
	await expect(rows.nth(1)).toContainText(ha(twoPartM2));

	await page.getByLabel('Save shape 3').uncheck();
	await expect(page.getByRole('button', { name: /^Save 2 fields/ })).toBeVisible();
	await mapIdle(page);
	await page.screenshot({ path: 'tests/screenshots/fields-import-preview-desktop.png', fullPage: true });
	await page.setViewportSize(viewports.phone);
	await mapIdle(page);
	await page.screenshot({ path: 'tests/screenshots/fields-import-preview-phone.png', fullPage: true });
	await page.setViewportSize(viewports.desktop);

	await page.getByRole('button', { name: /^Save 2 fields/ }).click();
	await expect(page).toHaveURL(/\/tallowgrass\/fields\?imported=2$/);
	await expect(page.getByRole('status')).toContainText('2 fields were saved');
	const table = page.getByTestId('fields-table');
	await expect(table.getByRole('row', { name: /Invented Pond Paddock/ })).toContainText(ha(holeFieldM2));
	await expect(table.getByRole('row', { name: /Invented Split Block/ })).toContainText(ha(twoPartM2));
	await expect(table).not.toContainText('Invented Leave Out');
	expect(offsite, 'requests that left the app').toEqual([]);
});

test('saving the same names again fails for each clashing field and saves nothing', async ({ page }) => {
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/fields/import');
	await page.getByLabel('Boundary file').setInputFiles({ name: 'invented-three.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify(threeFields)) });
	await page.getByRole('button', { name: 'Preview' }).click();
	await expect(page.getByTestId('import-feature')).toHaveCount(3);
	await page.getByRole('button', { name: /^Save 3 fields/ }).click();
	await expect(page.getByTestId('import-feature').nth(0)).toContainText('A field named “Invented Pond Paddock” already exists in this farm.');
	await expect(page.getByTestId('import-feature').nth(1)).toContainText('already exists');
	await expect(page.getByText('Nothing was saved: 2 fields need attention.')).toBeVisible();
	await page.goto('/tallowgrass/fields');
	await expect(page.getByTestId('fields-table')).not.toContainText('Invented Leave Out');
});

test('a bad file gets a message naming it; projected coordinates ask for an EPSG code', async ({ page }) => {
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/fields/import');
	await page.getByLabel('Boundary file').setInputFiles({ name: 'broken.geojson', mimeType: 'application/geo+json', buffer: Buffer.from('{"type": "FeatureCollection", "features": [') });
	await page.getByRole('button', { name: 'Preview' }).click();
	await expect(page.getByTestId('import-error')).toContainText('broken.geojson');

	// UTM 11N metres (an invented 300 m x 200 m block), with no CRS in the file.
	const utm = { type: 'Feature', properties: { name: 'Invented UTM Block' }, geometry: { type: 'Polygon', coordinates: [rect(420_000, 5_218_000, 420_300, 5_218_200)] } };
	await page.getByLabel('Boundary file').setInputFiles({ name: 'invented-utm.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify(utm)) });
	await page.getByRole('button', { name: 'Preview' }).click();
	await expect(page.getByTestId('import-error')).toContainText('EPSG');
	await page.getByLabel('EPSG code of the coordinates').fill('32611');
	await page.getByRole('button', { name: 'Preview' }).click();
	await expect(page.getByTestId('import-feature')).toHaveCount(1);
	await expect(page.getByLabel('Name of shape 1')).toHaveValue('Invented UTM Block');
	// 300 m x 200 m = 6 ha in UTM metres; on the ellipsoid it is larger by 1/k^2, with the scale
	// factor k = 0.9996 (1 + x^2 / 2R^2) = 0.99968 at x = 80 km from the central meridian (Snyder
	// 1987, eq. 8-1): 6.0038 ha.
	await expect(page.getByTestId('import-feature')).toContainText(/6\.00[34] ha/);
	await expect(page.getByTestId('import-warnings')).toContainText('EPSG:32611');
});

test('an over-size boundary file and a zip bomb are refused with a sentence; nothing is imported', async ({ page }) => {
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/fields/import');
	// 26 MB: over the 25 MB boundary limit (src/lib/ingest/limits.ts). The page says so without
	// sending it (the server's own refusal is tested in src/lib/server/upload-limits.test.ts).
	const posts: string[] = [];
	page.on('request', (r) => void (r.method() === 'POST' && posts.push(r.url())));
	const big = Buffer.alloc(26 * 1024 * 1024, 0x20);
	await page.getByLabel('Boundary file').setInputFiles({ name: 'huge.geojson', mimeType: 'application/geo+json', buffer: big });
	await page.getByRole('button', { name: 'Preview' }).click();
	await expect(page.getByTestId('import-error')).toHaveText('huge.geojson is 26.0 MB; a boundary file may be at most 25 MB.');
	expect(posts).toEqual([]);
	await page.screenshot({ path: 'tests/screenshots/fields-import-too-large-desktop.png', fullPage: true });
	await page.setViewportSize({ width: 390, height: 844 });
	await page.screenshot({ path: 'tests/screenshots/fields-import-too-large-phone.png', fullPage: true });
	await page.setViewportSize({ width: 1280, height: 800 });

	// 64 MB of zeros deflated to about 64 kB.
	const { zipSync } = await import('fflate');
	const bomb = zipSync({ 'bomb.shp': new Uint8Array(64 * 1024 * 1024), 'bomb.dbf': new Uint8Array(10) }, { level: 9 });
	await page.getByLabel('Boundary file').setInputFiles({ name: 'bomb.zip', mimeType: 'application/zip', buffer: Buffer.from(bomb) });
	await page.getByRole('button', { name: 'Preview' }).click();
	await expect(page.getByTestId('import-error')).toContainText(/bomb\.zip: zip entry 'bomb\.shp' expands \d+ times \(over 100x\); refused as a possible zip bomb/);
	await expect(page.getByTestId('import-feature')).toHaveCount(0);
});

test('a manager draws a field on the map, then renames and deletes it', async ({ page }) => {
	await page.setViewportSize(viewports.desktop);
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/fields');
	await page.getByRole('link', { name: 'Draw a field' }).click();
	await mapIdle(page);
	await expect(page.getByTestId('boundary-editor')).toBeVisible();
	const box = (await page.getByTestId('map').boundingBox())!;
	const at = (fx: number, fy: number) => [box.x + box.width * fx, box.y + box.height * fy] as const;
	for (const [fx, fy] of [[0.4, 0.35], [0.6, 0.35], [0.6, 0.55], [0.4, 0.55], [0.4, 0.35]]) {
		await page.mouse.click(...at(fx, fy));
		await page.waitForTimeout(150);
	}
	await expect(page.getByTestId('draft-area')).toContainText(/\d ha/);
	await page.getByLabel('Name').fill('Invented Drawn Field');
	await page.getByRole('button', { name: 'Save field' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'Invented Drawn Field' })).toBeVisible();
	await expect(page.getByTestId('field-area')).toContainText(/\d ha/);

	await page.getByRole('button', { name: 'Rename' }).click();
	await page.getByLabel('New name').fill('Invented Renamed Field');
	await page.getByRole('button', { name: 'Save name' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'Invented Renamed Field' })).toBeVisible();

	await page.getByRole('button', { name: 'Delete' }).click();
	await expect(page.getByRole('dialog')).toContainText('Delete Invented Renamed Field?');
	await page.getByRole('button', { name: 'Delete field' }).click();
	await expect(page).toHaveURL(/\/tallowgrass\/fields$/);
	await expect(page.getByTestId('fields-table')).not.toContainText('Invented Renamed Field');
});

test('renaming a field with a hole and two parts keeps its boundary and area', async ({ page }) => {
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/fields');
	await page.getByRole('link', { name: 'Invented Split Block' }).click();
	await expect(page.getByText('2 parts')).toBeVisible();
	const before = await page.getByTestId('field-area').textContent();
	await page.getByRole('button', { name: 'Rename' }).click();
	await page.getByLabel('New name').fill('Invented Split Block Renamed');
	await page.getByRole('button', { name: 'Save name' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'Invented Split Block Renamed' })).toBeVisible();
	await expect(page.getByText('2 parts')).toBeVisible();
	await expect(page.getByTestId('field-area')).toHaveText(before!);

	await page.getByRole('link', { name: 'All fields' }).click();
	await page.getByRole('link', { name: 'Invented Pond Paddock' }).click();
	await expect(page.getByText('One part, 1 hole')).toBeVisible();
	await expect(page.getByTestId('field-figures')).toContainText('No processed logs for this field yet.');
	await expect(page.getByText('UTM zone 11N (EPSG:32611)')).toBeVisible();
	for (const [name, size] of Object.entries(viewports)) {
		await page.setViewportSize(size);
		await mapIdle(page);
		await page.screenshot({ path: `tests/screenshots/fields-field-${name}.png`, fullPage: true });
		await page.goto('/tallowgrass/fields');
		await mapIdle(page);
		await page.screenshot({ path: `tests/screenshots/fields-list-${name}.png`, fullPage: true });
		await page.goBack();
	}
	// The editor opens on the same page, with the hole shown and nothing changed yet.
	await page.setViewportSize(viewports.desktop);
	await page.getByRole('button', { name: 'Edit boundary' }).click();
	await expect(page.locator('[data-testid="boundary-editor"][data-parts="1"]')).toBeVisible();
	await expect(page.getByRole('button', { name: 'Save boundary' })).toBeDisabled();
	await mapIdle(page);
	await page.screenshot({ path: 'tests/screenshots/fields-edit-desktop.png' });
});

test('removing one part of a two-part field keeps the other part exactly', async ({ page }) => {
	await page.setViewportSize(viewports.desktop);
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/fields');
	await page.getByRole('link', { name: 'Invented Split Block Renamed' }).click();
	await page.getByRole('button', { name: 'Edit boundary' }).click();
	await expect(page.locator('[data-testid="boundary-editor"][data-parts="2"]')).toBeVisible();
	await mapIdle(page);
	// The map fits the parts' bounds (lng -118.245 to -118.235, lat 47.100 to 47.104) into its box
	// less 48 px each side and the editor's 80 px toolbar. In web mercator a degree of latitude is
	// 1/cos(lat) degrees of longitude tall, so the bounds are 0.01 / (0.004 / cos 47.102°) = 1.70
	// times as wide as tall. The second part's middle (lng -118.2365) is 35% of the width right of centre.
	const box = (await page.getByTestId('map').boundingBox())!;
	const availW = box.width - 96, availH = box.height - 96 - 80;
	const widthPx = Math.min(availW, availH * (0.01 / (0.004 / Math.cos((47.102 * Math.PI) / 180))));
	const centreX = box.x + 48 + availW / 2, centreY = box.y + 48 + 80 + availH / 2;
	await page.mouse.click(centreX + 0.35 * widthPx, centreY);
	await page.getByRole('button', { name: 'Remove this part' }).click();
	await expect(page.locator('[data-testid="boundary-editor"][data-parts="1"]')).toBeVisible();
	await page.getByRole('button', { name: 'Save boundary' }).click();
	await expect(page.getByText('Boundary saved')).toBeVisible();
	await expect(page.getByText('One part', { exact: true })).toBeVisible();
	await expect(page.getByTestId('field-area')).toHaveText(ha(quadM2(-118.245, 47.1, -118.24, 47.104)));
});

test('an operator sees fields read-only and is refused every write', async ({ page }) => {
	await signIn(page, people.operator);
	await page.goto('/tallowgrass/fields');
	await expect(page.getByTestId('fields-table')).toContainText('North Flat');
	await expect(page.getByRole('link', { name: 'Import boundaries' })).toHaveCount(0);
	await expect(page.getByRole('link', { name: 'Draw a field' })).toHaveCount(0);
	await page.getByRole('link', { name: 'North Flat' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'North Flat' })).toBeVisible();
	await expect(page.getByTestId('field-manage')).toHaveCount(0);
	await expect(page.getByRole('button', { name: 'Rename' })).toHaveCount(0);
	const fieldUrl = page.url();
	const origin = new URL(fieldUrl).origin;
	for (const action of ['rename', 'boundary', 'remove']) {
		const response = await page.request.post(`${fieldUrl}?/${action}`, {
			headers: { origin, accept: 'application/json', 'x-sveltekit-action': 'true' },
			form: { name: 'Taken over', boundary: '{}' }
		});
		expect(response.status(), `POST ?/${action}`).toBe(403);
		expect((await response.json()).type).toBe('error');
	}
	expect((await page.goto('/tallowgrass/fields/import'))?.status()).toBe(403);
	expect((await page.goto('/tallowgrass/fields/new'))?.status()).toBe(403);
	await page.goto(fieldUrl);
	await expect(page.getByRole('heading', { level: 1, name: 'North Flat' })).toBeVisible();
});

test('a landlord may not open fields; another farm’s field id is not found', async ({ page }) => {
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/fields');
	await page.getByRole('link', { name: 'North Flat' }).click();
	await expect(page).toHaveURL(/\/fields\/[0-9a-f-]{36}$/);
	const id = page.url().split('/').pop();
	await page.context().clearCookies();

	await signIn(page, people.landlord);
	expect((await page.goto('/tallowgrass/fields'))?.status()).toBe(403);
	expect((await page.goto(`/tallowgrass/fields/${id}`))?.status()).toBe(403);
	await page.context().clearCookies();

	await signIn(page, people.otherFarmManager);
	expect((await page.goto(`/brennan-creek/fields/${id}`))?.status()).toBe(404);
	const api = await page.request.get('/api/farms/brennan-creek/fields/geojson');
	expect((await api.json()).features.map((f: { properties: { name: string } }) => f.properties.name)).toEqual(['Creek Bottom', 'Upper Bench']);
});

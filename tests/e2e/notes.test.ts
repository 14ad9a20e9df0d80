// Notes on the demo farm: an agronomist pins a note with a photo on the map and finds it on the
// map and the field page; the photo is served only to the farm's team; edits and deletes by the
// author or a manager; operators read; a file that is no image is refused with its name.
import sharp from 'sharp';
import { expect, test, type Page } from '@playwright/test';
import { people, signIn } from './helpers';

const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };
const stamp = Date.now().toString(36);
const body = `Kochia patch by the draw culvert, photo from the cab (${stamp})`;

test.describe.configure({ mode: 'serial' });

async function openMap(page: Page, who: string) {
	await signIn(page, who);
	await page.goto('/tallowgrass/map');
	await expect(page.locator('[data-testid="map"][data-map-ready="true"]')).toBeAttached({ timeout: 30_000 });
	await expect(page.locator('[data-testid="map-figures"][data-query]')).toBeAttached({ timeout: 30_000 });
}

async function showField(page: Page, name: string) {
	await page.getByRole('button', { name: `Show ${name} on the map` }).click();
	await page.waitForTimeout(50);
	await expect(page.locator('[data-testid="map"][data-map-idle="true"]')).toBeAttached({ timeout: 40_000 });
}

/** A photo made here: 1600 x 1200, straw ground with a dark patch, as a phone's JPEG would be. */
async function photo() {
	const patch = await sharp({ create: { width: 500, height: 400, channels: 3, background: { r: 70, g: 35, b: 10 } } }).png().toBuffer();
	return sharp({ create: { width: 1600, height: 1200, channels: 3, background: { r: 230, g: 207, b: 138 } } })
		.composite([{ input: patch, left: 600, top: 400 }])
		.jpeg({ quality: 85 })
		.toBuffer();
}

/** Whether an <img> in the page has loaded real pixels. */
const loaded = (page: Page, selector: string) =>
	page.locator(selector).first().evaluate(async (img: HTMLImageElement) => {
		if (!img.complete) await new Promise((r) => img.addEventListener('load', r, { once: true }));
		return img.naturalWidth;
	});

let noteId = '';

test('an agronomist pins a note with a photo on the map; it shows on the map and the field page', async ({ page }) => {
	test.setTimeout(120_000);
	await page.setViewportSize(viewports.desktop);
	await openMap(page, people.agronomist);
	await showField(page, 'Coyote Draw');
	const markers = page.getByTestId('note-marker');
	const before = await markers.count();

	await page.getByTestId('add-note').click();
	await expect(page.getByTestId('note-placing')).toContainText('Click or tap the map');
	const box = (await page.getByTestId('map').boundingBox())!;
	await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2);
	await expect(page.getByTestId('note-draft')).toBeVisible();
	const form = page.getByTestId('note-add-form');
	await form.getByLabel('Note').fill(body);
	await form.getByTestId('note-photo').setInputFiles({ name: 'culvert.jpg', mimeType: 'image/jpeg', buffer: await photo() });
	await page.screenshot({ path: 'tests/screenshots/notes-add-desktop.png' });
	await form.getByRole('button', { name: 'Save note' }).click();

	// The new note is selected in the panel, with its thumbnail, and has its pin.
	const card = page.getByTestId('map-notes').getByTestId('note');
	await expect(card.getByTestId('note-body')).toHaveText(body);
	noteId = (await card.getAttribute('data-note-id'))!;
	expect(await loaded(page, `[data-note-id="${noteId}"] [data-testid="note-thumb"]`)).toBe(480);
	await expect(markers).toHaveCount(before + 1);
	await expect(page.locator(`[data-testid="note-marker"][data-note-id="${noteId}"]`)).toHaveAttribute('aria-pressed', 'true');
	await expect(card).toContainText('Coyote Draw');
	await page.screenshot({ path: 'tests/screenshots/notes-map-desktop.png' });

	// Clicking the pin after closing the card opens it again.
	await card.getByRole('button', { name: 'Close the note' }).click();
	await expect(card).toHaveCount(0);
	await page.locator(`[data-testid="note-marker"][data-note-id="${noteId}"]`).click();
	await expect(page.getByTestId('map-notes').getByTestId('note-body')).toHaveText(body);

	// The field page lists it with the thumbnail, and pins it on its map.
	const notes = (await (await page.request.get('/api/farms/tallowgrass/notes')).json()) as { id: string; fieldId: string; fieldName: string }[];
	const mine = notes.find((n) => n.id === noteId)!;
	expect(mine.fieldName).toBe('Coyote Draw');
	await page.goto(`/tallowgrass/fields/${mine.fieldId}`);
	const listed = page.getByTestId('field-notes').locator(`[data-note-id="${noteId}"]`);
	await expect(listed.getByTestId('note-body')).toHaveText(body);
	expect(await loaded(page, `[data-testid="field-notes"] [data-note-id="${noteId}"] [data-testid="note-thumb"]`)).toBe(480);
	await expect(page.locator(`[data-testid="note-marker"][data-note-id="${noteId}"]`)).toBeAttached({ timeout: 30_000 });
	await listed.scrollIntoViewIfNeeded();
	await page.screenshot({ path: 'tests/screenshots/notes-field-desktop.png' });

	// The full photo is the uploaded JPEG.
	const full = await page.request.get(`/api/farms/tallowgrass/notes/${noteId}/photo?size=full`);
	expect(full.headers()['content-type']).toBe('image/jpeg');
	expect(full.headers()['x-content-type-options']).toBe('nosniff');
	expect((await sharp(await full.body()).metadata()).width).toBe(1600);

	// The author edits the text on the field page.
	await listed.getByRole('button', { name: 'Edit' }).click();
	const edit = listed.getByTestId('note-edit-form');
	await edit.getByLabel('Note').fill(`${body}, sprayed again in June`);
	await edit.getByRole('button', { name: 'Save changes' }).click();
	await expect(listed.getByTestId('note-body')).toHaveText(`${body}, sprayed again in June`);
	await expect(listed).toContainText('edited');
});

test('on a phone an agronomist taps Add note, then the map, and writes the note', async ({ page }) => {
	test.setTimeout(90_000);
	await page.setViewportSize(viewports.phone);
	await openMap(page, people.agronomist);
	await page.locator('button[aria-controls="map-sheet"]').click();
	await page.getByTestId('add-note').click();
	// The sheet folds away so the map can be tapped.
	await expect(page.locator('#map-sheet')).toBeHidden();
	await expect(page.getByRole('status').filter({ hasText: 'Tap where the note belongs' })).toBeVisible();
	await page.screenshot({ path: 'tests/screenshots/notes-place-phone.png' });
	const box = (await page.getByTestId('map').boundingBox())!;
	await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2);
	await expect(page.getByTestId('note-draft')).toBeVisible();
	const form = page.getByTestId('note-add-form');
	await expect(form).toBeVisible();
	await form.getByLabel('Note').fill(`Check the wet corner after rain (${stamp})`);
	await form.getByTestId('note-photo').setInputFiles({ name: 'corner.jpg', mimeType: 'image/jpeg', buffer: await photo() });
	await page.screenshot({ path: 'tests/screenshots/notes-add-phone.png' });
	await form.getByRole('button', { name: 'Save note' }).click();
	const card = page.getByTestId('map-notes').getByTestId('note');
	await expect(card.getByTestId('note-body')).toHaveText(`Check the wet corner after rain (${stamp})`);
	expect(await loaded(page, '[data-testid="map-notes"] [data-testid="note"] [data-testid="note-thumb"]')).toBe(480);
	await expect(card).not.toContainText('outside the fields');
	await page.screenshot({ path: 'tests/screenshots/notes-map-phone.png' });
	// Tidy up: the author deletes it.
	await card.getByRole('button', { name: 'Delete' }).click();
	await page.getByRole('dialog').getByRole('button', { name: 'Delete note' }).click();
	await expect(card).toHaveCount(0);
});

test('a file that is no image is refused with its name; nothing is saved', async ({ page }) => {
	await openMap(page, people.agronomist);
	const before = ((await (await page.request.get('/api/farms/tallowgrass/notes')).json()) as unknown[]).length;
	await page.getByTestId('add-note').click();
	await page.getByRole('button', { name: 'Use the map’s centre' }).click();
	const form = page.getByTestId('note-add-form');
	await form.getByLabel('Note').fill('This one has no real photo');
	await form.getByTestId('note-photo').setInputFiles({ name: 'weeds.jpg', mimeType: 'image/jpeg', buffer: Buffer.from('GIF89a but not really') });
	await form.getByRole('button', { name: 'Save note' }).click();
	await expect(form.getByTestId('note-problem')).toHaveText('weeds.jpg is not a JPEG, PNG or WebP image (judged by its content, not its name).');
	expect(((await (await page.request.get('/api/farms/tallowgrass/notes')).json()) as unknown[]).length).toBe(before);
});

test('the photo is served only to the farm’s team', async ({ page, request }) => {
	expect(noteId).not.toBe('');
	const url = `/api/farms/tallowgrass/notes/${noteId}/photo`;
	expect((await request.get(url)).status()).toBe(401);
	await signIn(page, people.landlord);
	expect((await page.request.get(url)).status()).toBe(403);
	expect((await page.request.get('/api/farms/tallowgrass/notes')).status()).toBe(403);
	await page.context().clearCookies();
	await signIn(page, people.otherFarmManager);
	expect((await page.request.get(url)).status()).toBe(404);
	await page.context().clearCookies();
	await signIn(page, people.operator);
	expect((await page.request.get(url)).status()).toBe(200);
});

test('an operator sees the note on the map but cannot add, edit or delete notes', async ({ page }) => {
	await page.setViewportSize(viewports.phone);
	await openMap(page, people.operator);
	await expect(page.locator(`[data-testid="note-marker"][data-note-id="${noteId}"]`)).toBeAttached();
	await page.locator('button[aria-controls="map-sheet"]').click();
	await expect(page.getByTestId('map-notes')).toBeVisible();
	await expect(page.getByTestId('add-note')).toHaveCount(0);
	await page.getByTestId('note-list').getByRole('button').filter({ hasText: 'Kochia patch by the draw culvert' }).first().click();
	const card = page.getByTestId('map-notes').getByTestId('note');
	await expect(card).toBeVisible();
	await expect(card.getByRole('button', { name: 'Edit' })).toHaveCount(0);
	await page.screenshot({ path: 'tests/screenshots/notes-map-operator-phone.png' });
	// The action refuses as well.
	const refused = await page.request.post('/tallowgrass/map?/noteAdd', {
		multipart: { body: 'not allowed', season: '2026', lng: '-118.3', lat: '47.1' },
		headers: { origin: 'http://127.0.0.1:' + (process.env.E2E_PORT ?? 4173), 'x-sveltekit-action': 'true' }
	});
	expect(refused.status()).toBe(403);
});

test('a manager deletes a note after confirming; it leaves the map', async ({ page }) => {
	await page.setViewportSize(viewports.phone);
	await openMap(page, people.manager);
	const pin = page.locator(`[data-testid="note-marker"][data-note-id="${noteId}"]`);
	await expect(pin).toBeAttached();
	await page.locator('button[aria-controls="map-sheet"]').click();
	await page.getByTestId('note-list').getByRole('button').filter({ hasText: 'Kochia patch by the draw culvert' }).first().click();
	const card = page.getByTestId('map-notes').getByTestId('note');
	await card.getByRole('button', { name: 'Delete' }).click();
	const dialog = page.getByRole('dialog');
	await expect(dialog).toContainText('Delete this note?');
	await page.screenshot({ path: 'tests/screenshots/notes-delete-phone.png' });
	await dialog.getByRole('button', { name: 'Delete note' }).click();
	await expect(pin).toHaveCount(0);
	await expect(card).toHaveCount(0);
	const photo = await page.request.get(`/api/farms/tallowgrass/notes/${noteId}/photo`);
	expect(photo.status()).toBe(404);
});

import { expect, test } from '@playwright/test';
import { people, signIn } from './helpers';
import { fieldBox, passesCsv } from './logs';

test('an operator on a phone uploads a log, maps it and sees it processed', async ({ page }) => {
	test.setTimeout(120_000);
	await page.setViewportSize({ width: 390, height: 844 });
	await signIn(page, people.operator);
	await page.goto('/tallowgrass/uploads');
	const { csv, lengthM, passes, day } = passesCsv(await fieldBox(page.request, 'tallowgrass', 'North Flat'));
	await page.getByTestId('upload-input').setInputFiles({ name: `north-flat-${day}.csv`, mimeType: 'text/csv', buffer: Buffer.from(csv) });
	await expect(page.getByRole('progressbar', { name: /Upload of north-flat/ })).toHaveAttribute('aria-valuenow', '100');
	await page.getByRole('link', { name: 'Map its columns' }).click();

	// The detector found every column from its name.
	await expect(page.getByRole('columnheader', { name: 'time', exact: true })).toBeVisible();
	await expect(page.getByRole('columnheader', { name: 'latitude' })).toBeVisible();
	await expect(page.getByRole('columnheader', { name: 'nozzles 1' })).toBeVisible();
	await page.screenshot({ path: 'tests/screenshots/operator-upload-mapping-phone.png', fullPage: true });

	await page.getByLabel('Machine').selectOption({ label: 'Spot sprayer 36.6 m (144 nozzles)' });
	await page.getByLabel('Tank mix').selectOption({ label: 'Fallow knockdown' });
	await page.getByRole('button', { name: 'Process this log' }).click();
	await expect(page.getByTestId('upload-status')).toContainText('Processed', { timeout: 60_000 });
	await page.screenshot({ path: 'tests/screenshots/operator-upload-done-phone.png', fullPage: true });

	const row = page.getByTestId('upload-applications').getByRole('row', { name: /North Flat/ });
	await expect(row).toContainText(day);
	// Two passes that just touch: covered = 2 x length x 36.576 m; half the nozzles open: 50% sprayed.
	const cells = await row.getByRole('cell').allTextContents();
	// Shown in the operator's units: hectares, or acres (1 ac = 0.40468564224 ha, NIST SP 811).
	const coveredHa = Number(cells[2].replace(/[^\d.]/g, '')) * (cells[2].includes('ac') ? 0.40468564224 : 1);
	const expectedHa = (passes * lengthM * 36.576) / 1e4;
	expect(Math.abs(coveredHa - expectedHa) / expectedHa).toBeLessThan(0.01);
	expect(Number(cells[4])).toBeCloseTo(50, 0);

	// The field page and the farm overview show the same application.
	await row.getByRole('link', { name: 'North Flat' }).click();
	await expect(page.getByTestId('field-applications').getByRole('row', { name: new RegExp(day) })).toContainText('Fallow knockdown');
	await page.screenshot({ path: 'tests/screenshots/operator-field-figures-phone.png', fullPage: true });
	await page.goto('/tallowgrass?season=2026');
	await expect(page.getByTestId('season-totals')).toContainText('Sprayed share');
	await expect(page.getByTestId('season-figures').getByRole('row', { name: /North Flat/ })).toContainText('Glyphosate 540 (demo)');
	// Operators see no prices: the saved amount is in litres, with no money.
	await expect(page.getByTestId('season-figures')).not.toContainText('$');
	await page.setViewportSize({ width: 1280, height: 800 });
	await page.screenshot({ path: 'tests/screenshots/operator-overview-figures-desktop.png', fullPage: true });
});

test('a manager sees the chemical saved in money on the overview', async ({ page }) => {
	await signIn(page, people.manager);
	await page.goto('/tallowgrass');
	await expect(page.getByTestId('season-totals')).toContainText('Chemical saved (est.)');
	await expect(page.getByTestId('season-figures')).toContainText('$');
	await page.screenshot({ path: 'tests/screenshots/manager-overview-figures-desktop.png', fullPage: true });
});

test('the same file uploaded twice is recognised and not counted twice', async ({ page }) => {
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/uploads');
	const { csv } = passesCsv(await fieldBox(page.request, 'tallowgrass', 'North Flat'), { passes: 1 });
	const file = { name: 'one-pass.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) };
	await page.getByTestId('upload-input').setInputFiles(file);
	await expect(page.getByRole('link', { name: 'Map its columns' })).toBeVisible();
	await page.getByTestId('upload-input').setInputFiles({ ...file, name: 'one-pass-again.csv' });
	await expect(page.getByText('This file was uploaded before; nothing is counted twice.')).toBeVisible();
	await expect(page.getByTestId('upload-list').getByText('one-pass.csv')).toHaveCount(1);
	await expect(page.getByTestId('upload-list').getByText('one-pass-again.csv')).toHaveCount(0);
});

test('a file of another kind is refused with a clear message', async ({ page }) => {
	await signIn(page, people.operator);
	await page.goto('/tallowgrass/uploads');
	await page.getByTestId('upload-input').setInputFiles({ name: 'notes.docx', mimeType: 'application/octet-stream', buffer: Buffer.from('x') });
	await expect(page.getByRole('alert')).toContainText('notes.docx: Patchbook reads as-applied logs as CSV');
});

test('a log with a bad row fails whole, naming the row and column, and counts nothing', async ({ page }) => {
	test.setTimeout(90_000);
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/uploads');
	const { csv } = passesCsv(await fieldBox(page.request, 'tallowgrass', 'North Flat'), { passes: 1 });
	const lines = csv.trimEnd().split('\n');
	lines[6] = lines[6].replace(/,(\d+\.\d+),-/, ',forty-seven,-');
	await page.getByTestId('upload-input').setInputFiles({ name: 'bad-row.csv', mimeType: 'text/csv', buffer: Buffer.from(lines.join('\n')) });
	await page.getByRole('link', { name: 'Map its columns' }).click();
	await page.getByLabel('Machine').selectOption({ label: 'Spot sprayer 36.6 m (144 nozzles)' });
	await page.getByLabel('Tank mix').selectOption({ label: 'Fallow knockdown' });
	await page.getByRole('button', { name: 'Process this log' }).click();
	await expect(page.getByTestId('upload-error')).toContainText('bad-row.csv, row 7', { timeout: 60_000 });
	await expect(page.getByTestId('upload-error')).toContainText('Lat (deg)');
	await expect(page.getByTestId('upload-status')).toContainText('Failed');
});

test('API: uploads need a role that may upload, and a farm you belong to', async ({ page }) => {
	await signIn(page, people.agronomist);
	const denied = await page.request.post('/api/farms/tallowgrass/uploads?name=x.csv', { data: 'a,b\n1,2\n' });
	expect(denied.status()).toBe(403);
	await page.context().clearCookies();
	await signIn(page, people.otherFarmManager);
	const otherFarm = await page.request.post('/api/farms/tallowgrass/uploads?name=x.csv', { data: 'a,b\n1,2\n' });
	expect(otherFarm.status()).toBe(404);
});

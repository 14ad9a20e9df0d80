// Savings on the demo farm: what spot spraying saved per field this season and last, for the
// manager only; totals add up, sorting sorts, the CSV holds the table, the caveat is in view.
import Papa from 'papaparse';
import { expect, test, type Page } from '@playwright/test';
import { people, signIn } from './helpers';

const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };

async function rowsOf(page: Page) {
	return page.locator('[data-testid="savings-table"] tbody tr').evaluateAll((trs) =>
		trs.map((tr) => ({
			field: tr.getAttribute('data-field')!,
			season: Number(tr.getAttribute('data-season')),
			product: tr.getAttribute('data-product')!,
			savedCost: Number(tr.getAttribute('data-saved-cost'))
		}))
	);
}

test('a manager reads what spot spraying saved per field this season and last', async ({ page }) => {
	await page.setViewportSize(viewports.desktop);
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/savings');
	await expect(page.getByRole('heading', { level: 1, name: 'Savings' })).toBeVisible();
	// The caveat, in view without scrolling.
	const caution = page.getByTestId('savings-caution');
	await expect(caution).toContainText('estimates from logged data');
	await expect(caution).toContainText('label and local regulations govern');
	expect((await caution.boundingBox())!.y).toBeLessThan(viewports.desktop.height);

	// Season cards: the demo has 2024, 2025 and 2026, each with money saved.
	const cards = page.getByTestId('savings-by-season').locator('li');
	await expect(cards).toHaveCount(3);
	await expect(cards.first()).toHaveAttribute('data-season', '2026');
	for (const text of await page.getByTestId('season-saved').allInnerTexts()) expect(Number(text.replace(/[^0-9.]/g, ''))).toBeGreaterThan(0);

	// This season and last, per field: every one of the ten fields saved something in both, and
	// the fields add up to the season's total.
	const byField = page.getByTestId('savings-by-field');
	await expect(byField.locator('tbody tr')).toHaveCount(10);
	for (const season of [2026, 2025]) {
		const cells = await byField.locator(`tbody td[data-season="${season}"]`).evaluateAll((tds) => tds.map((td) => Number(td.getAttribute('data-saved-cost'))));
		expect(cells.every((v) => v > 0), `every field saved money in ${season}`).toBe(true);
		const total = await byField.locator(`tfoot td[data-season="${season}"]`).innerText();
		expect(Number(total.replace(/[^0-9.]/g, ''))).toBeCloseTo(cells.reduce((a, b) => a + b, 0), 1);
		const card = await page.locator(`[data-testid="savings-by-season"] li[data-season="${season}"] [data-testid="season-saved"]`).innerText();
		expect(card).toBe(total);
	}
	await page.screenshot({ path: 'tests/screenshots/savings-desktop.png', fullPage: true });

	// The detailed table starts at this season: only 2026 rows, and its total is their sum.
	await expect(page.getByRole('combobox', { name: 'Season' })).toHaveValue('2026');
	await expect(page.locator('[data-testid="savings-table"] tbody tr[data-season="2025"]')).toHaveCount(0);
	const season = await rowsOf(page);
	expect(season.length).toBeGreaterThanOrEqual(20);
	expect(season.every((r) => r.savedCost > 0)).toBe(true);
	const total = await page.getByTestId('total-saved').innerText();
	expect(Number(total.replace(/[^0-9.]/g, ''))).toBeCloseTo(season.reduce((s, r) => s + r.savedCost, 0), 1);

	// Every season at once, then last season alone.
	await page.getByRole('combobox', { name: 'Season' }).selectOption('all');
	await expect(page).toHaveURL(/season=all/);
	await expect(page.locator('[data-testid="savings-table"] tbody tr[data-season="2024"]').first()).toBeVisible();
	await page.getByRole('combobox', { name: 'Season' }).selectOption('2025');
	await expect(page).toHaveURL(/season=2025/);
	await expect(page.locator('[data-testid="savings-table"] tbody tr[data-season="2026"]')).toHaveCount(0);
	await page.getByRole('combobox', { name: 'Season' }).selectOption('2026');
	await expect(page).toHaveURL(/season=2026/);

	// Sorting by money saved, biggest first, then smallest first.
	await page.locator('button[data-sort="savedCost"]').click();
	const down = (await rowsOf(page)).map((r) => r.savedCost);
	expect(down).toEqual([...down].sort((a, b) => b - a));
	await page.locator('button[data-sort="savedCost"]').click();
	const up = (await rowsOf(page)).map((r) => r.savedCost);
	expect(up).toEqual([...up].sort((a, b) => a - b));
	await expect(page.locator('[data-testid="savings-table"] th[aria-sort="ascending"]')).toContainText('Saved (USD)');

	// One field and one product.
	await page.getByRole('combobox', { name: 'Field' }).selectOption({ label: 'Coyote Draw' });
	await page.getByRole('combobox', { name: 'Product' }).selectOption({ label: 'Glyphosate 540 (demo)' });
	await expect(page).toHaveURL(/field=.*product=/);
	await expect(page.locator('[data-testid="savings-table"] tbody tr')).toHaveCount(1);

	// The CSV of the same filter: RFC 4180 line ends, units in the header, the same figure.
	const href = await page.getByTestId('savings-csv').getAttribute('href');
	const response = await page.request.get(href!);
	expect(response.headers()['content-type']).toMatch(/^text\/csv/);
	expect(response.headers()['content-disposition']).toMatch(/attachment; filename="tallowgrass-savings-2026\.csv"/);
	const text = await response.text();
	expect(text.endsWith('\r\n')).toBe(true);
	const [header, ...records] = Papa.parse<string[]>(text.trim(), { newline: '\r\n' }).data;
	expect(header).toContain('Saved (USD)');
	expect(header).toContain('Covered area (ha)');
	expect(records).toHaveLength(1);
	const [row] = await rowsOf(page);
	expect(Number(records[0][header.indexOf('Saved (USD)')])).toBeCloseTo(row.savedCost, 2);
	expect(records[0][header.indexOf('Field')]).toBe('Coyote Draw');
});

test('a filter naming nothing says so and shows everything', async ({ page }) => {
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/savings?season=1887');
	await expect(page.getByRole('alert')).toContainText('Season “1887” has no applications');
	await expect(page.locator('[data-testid="savings-table"] tbody tr').first()).toBeVisible();
});

test('agronomists, operators and landlords cannot open savings or its CSV', async ({ page }) => {
	for (const who of [people.agronomist, people.operator, people.landlord]) {
		await signIn(page, who);
		const response = await page.goto('/tallowgrass/savings');
		expect(response!.status(), who).toBe(403);
		expect((await page.request.get('/tallowgrass/savings/csv')).status(), who).toBe(403);
		await page.context().clearCookies();
	}
	// Another farm's manager: the farm does not exist for them.
	await signIn(page, people.otherFarmManager);
	expect((await page.request.get('/tallowgrass/savings/csv')).status()).toBe(404);
});

test('savings on a phone: caveat first, the table scrolls inside its box', async ({ page }) => {
	await page.setViewportSize(viewports.phone);
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/savings?season=2025');
	await expect(page.getByTestId('savings-caution')).toBeVisible();
	const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
	expect(overflow).toBeLessThanOrEqual(0);
	await page.screenshot({ path: 'tests/screenshots/savings-2025-phone.png', fullPage: true });
});

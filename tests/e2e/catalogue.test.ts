// The catalogue end to end: values typed in one unit system, stored in SI, read in the other;
// operators see no prices and change nothing. Rows made here are invented and named "(test)".
import { expect, test, type Page } from '@playwright/test';
import { people, signIn } from './helpers';

// A suffix per run, so a second run against a server kept alive does not meet its own rows.
const run = Date.now().toString(36).slice(-5);

async function setUnits(page: Page, units: 'metric' | 'us') {
	await page.goto('/account');
	await page.getByLabel(units === 'us' ? /US customary/ : /Metric/).check();
	await page.getByRole('button', { name: 'Save units' }).click();
	await expect(page.getByText('Units saved.')).toBeVisible();
}

test('a manager adds a machine in US units; it is kept in SI and reads back in metric', async ({ page }) => {
	const name = `Wide boom ${run} (test)`;
	await signIn(page, people.manager);
	await setUnits(page, 'us');
	try {
		await page.goto('/tallowgrass/catalogue');
		await page.getByText('Add a machine').click();
		const add = page.locator('details', { hasText: 'Add a machine' });
		await add.getByLabel('Name').fill(name);
		await add.getByLabel(/^Boom width/).fill('100');
		await add.getByLabel(/^Nozzle count/).fill('144');
		await add.getByLabel(/^Nozzle spacing/).fill('10');
		await add.getByRole('button', { name: 'Add machine' }).click();
		// 144 x 10 in = 120 ft, not 100 ft: refused, with both figures in feet.
		await expect(add.getByText('144 nozzles × 10 in = 120 ft, but the boom width is 100 ft (20% apart).', { exact: false })).toBeVisible();

		await add.getByLabel(/^Boom width/).fill('120');
		await add.getByRole('button', { name: 'Add machine' }).click();
		await expect(page.getByRole('status').filter({ hasText: `Machine “${name}” added.` })).toBeVisible();
		const row = page.locator('tr', { has: page.getByRole('rowheader', { name }) });
		await expect(row).toContainText('120 ft');
		await expect(row).toContainText('10 in');
		await expect(row).toContainText('144');

		await setUnits(page, 'metric');
		await page.goto('/tallowgrass/catalogue');
		// 120 ft = 36.576 m and 10 in = 25.4 cm exactly (NIST SP 811).
		await expect(row).toContainText('36.58 m');
		await expect(row).toContainText('25.4 cm');
		await row.getByRole('link', { name: `Edit ${name}` }).click();
		await expect(page.getByLabel(/^Boom width \(m\)/).first()).toHaveValue('36.576');
		await expect(page.getByLabel(/^Nozzle spacing \(cm\)/).first()).toHaveValue('25.4');
	} finally {
		await setUnits(page, 'metric');
	}
});

test('a manager adds a priced product and a tank mix with its label rate; a product in a mix cannot be deleted', async ({ page }) => {
	const product = `Glyphosate ${run} (test)`;
	const mix = `Knockdown ${run} (test)`;
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/catalogue');
	// A <details> opened before hydration is closed again when the page hydrates.
	await page.locator('html[data-hydrated="true"]').waitFor();

	await page.getByText('Add a product').click();
	const addProduct = page.locator('details', { hasText: 'Add a product' });
	await addProduct.getByLabel('Name').fill(product);
	await addProduct.getByLabel('Registration number').fill('TEST-REG-0001 (fictitious)');
	await addProduct.getByLabel(/Volume/).check();
	await addProduct.getByLabel(/^Price per L/).fill('8.5');
	await addProduct.getByRole('button', { name: 'Add product' }).click();
	await expect(page.getByRole('status').filter({ hasText: `Product “${product}” added.` })).toBeVisible();
	const productRow = page.locator('tr', { has: page.getByRole('rowheader', { name: product }) });
	await expect(productRow).toContainText('$8.50/L');

	await expect(page.getByRole('note').filter({ hasText: 'The label is the law' })).toContainText('licensed applicator');
	await page.getByText('Add a tank mix').click();
	const addMix = page.locator('details', { hasText: 'Add a tank mix' });
	await addMix.getByLabel('Name').fill(mix);
	await addMix.getByLabel(/^Carrier rate/).fill('100');
	await addMix.getByLabel('Product 1', { exact: true }).selectOption({ label: product });
	await addMix.getByLabel('Label rate').first().fill('1.5');
	await addMix.getByRole('button', { name: 'Add tank mix' }).click();
	await expect(page.getByRole('status').filter({ hasText: `Tank mix “${mix}” added.` })).toBeVisible();
	const mixRow = page.locator('tr', { has: page.getByRole('rowheader', { name: mix }) });
	await expect(mixRow).toContainText('100 L/ha');
	await expect(mixRow).toContainText(`${product} · 1.5 L/ha`);

	await productRow.getByRole('link', { name: `Delete ${product}` }).click();
	await expect(page.getByText(`Delete the product “${product}”?`)).toBeVisible();
	await page.getByRole('button', { name: 'Delete', exact: true }).click();
	await expect(page.getByRole('alert')).toContainText(`is used in the tank mix “${mix}”`);
	await expect(productRow).toBeVisible();
});

test('an operator sees the catalogue without prices and without edit buttons', async ({ page }) => {
	await signIn(page, people.operator);
	const response = await page.goto('/tallowgrass/catalogue');
	expect(response?.status()).toBe(200);
	await expect(page.getByRole('rowheader', { name: 'Glyphosate 540 (demo)' })).toBeVisible();
	await expect(page.getByRole('rowheader', { name: 'Spot sprayer 36.6 m' })).toBeVisible();
	await expect(page.getByTestId('read-only')).toBeVisible();
	await expect(page.getByRole('columnheader', { name: 'Price' })).toHaveCount(0);
	await expect(page.getByRole('link', { name: /^(Edit|Delete) / })).toHaveCount(0);
	await expect(page.getByText(/Add a (machine|product|tank mix)/)).toHaveCount(0);
	// Not hidden either: the page data sent to the browser holds no price (demo glyphosate is 7.40).
	const pageData = await (await page.request.get('/tallowgrass/catalogue/__data.json')).text();
	expect(pageData).toContain('Glyphosate 540 (demo)');
	expect(pageData).not.toContain('pricePerUnit');
	expect(pageData).not.toMatch(/(?<![\d:])7\.4(?!\d)/);
});

test('an agronomist sees prices but cannot edit', async ({ page }) => {
	await signIn(page, people.agronomist);
	await page.goto('/tallowgrass/catalogue');
	const row = page.locator('tr', { has: page.getByRole('rowheader', { name: 'Glyphosate 540 (demo)' }) });
	await expect(row).toContainText('/gal'); // this demo agronomist reads US units
	await expect(page.getByRole('link', { name: /^Edit / })).toHaveCount(0);
});

test('a POST to an edit action as an operator gets 403 and changes nothing', async ({ page, baseURL }) => {
	await signIn(page, people.operator);
	const name = `Operator boom ${run} (test)`;
	for (const action of ['saveMachine', 'deleteMachine', 'saveProduct', 'saveTankMix']) {
		const response = await page.request.post(`/tallowgrass/catalogue?/${action}`, {
			// Same origin, as a real form sends: the refusal must come from the role, not CSRF.
			headers: { origin: baseURL! },
			form: { id: '', name, boomWidth: '36', nozzleCount: '72', nozzleSpacing: '50', unit: 'L', carrierRate: '100' }
		});
		expect(response.status(), action).toBe(403);
		expect(await response.text()).toContain('Your role in this farm does not give access to this page.');
	}
	await page.goto('/tallowgrass/catalogue');
	await expect(page.getByRole('rowheader', { name: 'Spot sprayer 36.6 m' })).toBeVisible();
	await expect(page.getByRole('rowheader', { name })).toHaveCount(0);
});

const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };
for (const [size, viewport] of Object.entries(viewports)) {
	test(`catalogue screenshots on a ${size}`, async ({ page }) => {
		await page.setViewportSize(viewport);
		for (const role of ['manager', 'operator'] as const) {
			await page.context().clearCookies();
			await signIn(page, people[role]);
			await page.goto('/tallowgrass/catalogue');
			await expect(page.getByRole('heading', { level: 1, name: 'Catalogue' })).toBeVisible();
			const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
			expect(overflow, 'horizontal overflow').toBeLessThanOrEqual(0);
			await page.screenshot({ path: `tests/screenshots/catalogue-${role}-${size}.png`, fullPage: true });
		}
		// The manager's forms: an open tank mix edit with a refused rate, and an open add form.
		await page.context().clearCookies();
		await signIn(page, people.manager);
		await page.goto('/tallowgrass/catalogue');
		await page.getByRole('link', { name: 'Edit Fallow knockdown' }).click();
		const edit = page.locator('form', { has: page.getByRole('button', { name: 'Save tank mix' }) });
		await edit.getByLabel(/^Carrier rate/).fill('1');
		await edit.getByRole('button', { name: 'Save tank mix' }).click();
		await expect(edit.getByText('The carrier rate must be between')).toBeVisible();
		await edit.screenshot({ path: `tests/screenshots/catalogue-mix-form-${size}.png` });
		await page.getByText('Add a machine').click();
		const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
		expect(overflow, 'horizontal overflow with forms open').toBeLessThanOrEqual(0);
		await page.screenshot({ path: `tests/screenshots/catalogue-manager-forms-${size}.png`, fullPage: true });
	});
}

// Landlords and season summaries on the demo farm: the manager grants Helen a third field on a
// 25 % crop share and e-mails her the season summary; Helen follows the link in the mail, signs
// in, reads a field's summary, prints the season (one field per A4 page) and downloads the PDF,
// which pdfjs-dist (an independent reader) reads back. She never sees a field not granted.
import { readFileSync } from 'node:fs';
import { expect, test, type Page } from '@playwright/test';
import { linksIn, password, people, signIn, waitForMail } from './helpers';

const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };
const helen = people.landlord;
const granted = ['Coyote Draw', 'North Flat', 'Schoolhouse'];
const notGranted = ['East Bench', 'Home Place', 'Little Draw', 'Long Hill', 'Railside', 'Split Forty', 'Wetland Quarter', 'Creek Bottom'];

async function pdfPages(bytes: Uint8Array): Promise<string[]> {
	const pdfjs = await import('pdfjs-dist/legacy/build/pdf.mjs');
	const pdf = await pdfjs.getDocument({ data: bytes }).promise;
	const pages: string[] = [];
	for (let i = 1; i <= pdf.numPages; i++) {
		const content = await (await pdf.getPage(i)).getTextContent();
		pages.push(content.items.map((x) => ('str' in x ? x.str : '')).join(' '));
	}
	return pages;
}

function helensSection(page: Page) {
	return page.locator(`[data-testid="landlord"][data-email="${helen}"]`);
}

async function setCoyoteDraw(page: Page, grant: boolean, share = '25') {
	const section = helensSection(page);
	const row = section.locator('tr[data-field="Coyote Draw"]');
	await row.getByRole('checkbox').setChecked(grant);
	if (grant) {
		await row.getByRole('radio', { name: 'Crop share' }).check();
		await row.getByRole('textbox').fill(share);
	}
	await section.getByRole('button', { name: /^Save .*fields$/ }).click();
}

test('the manager grants Helen a field and mails her the summary; she reads, prints and downloads it', async ({ page, browser }) => {
	test.setTimeout(180_000);
	await page.setViewportSize(viewports.desktop);
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/summaries');
	await page.getByRole('link', { name: 'Landlords and their fields' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'Landlords and their fields' })).toBeVisible();
	await page.locator('html[data-hydrated="true"]').waitFor();
	const section = helensSection(page);
	await expect(section.locator('tr[data-field="North Flat"] input[type="checkbox"]')).toBeChecked();
	await expect(section.locator('tr[data-field="Schoolhouse"] input[type="checkbox"]')).toBeChecked();

	// A share out of range is refused with the field's name, and nothing is saved.
	await setCoyoteDraw(page, true, '120');
	await expect(section.getByTestId('grant-problems')).toContainText('Coyote Draw: the crop share must be a number from 0 to 100 percent; “120” is not.');
	await page.reload();
	await expect(helensSection(page).locator('tr[data-field="Coyote Draw"] input[type="checkbox"]')).not.toBeChecked();

	await setCoyoteDraw(page, true, '25');
	await expect(helensSection(page).getByTestId('grants-saved')).toContainText('Coyote Draw granted (25 % crop share)');
	await page.evaluate(() => window.scrollTo(0, 0));
	await page.screenshot({ path: 'tests/screenshots/summaries-grants-desktop.png', fullPage: true });
	await page.setViewportSize(viewports.phone);
	expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0);
	await page.screenshot({ path: 'tests/screenshots/summaries-grants-phone.png', fullPage: true });
	await page.setViewportSize(viewports.desktop);

	// The mail: a link and names, no figures.
	const since = new Date(Date.now() - 2000);
	await helensSection(page).getByTestId('email-form').getByRole('button', { name: 'E-mail the season summary' }).click();
	await expect(helensSection(page).getByTestId('email-result')).toContainText(`season summary link was sent to Helen`);
	const mail = await waitForMail(helen, { since, kind: 'landlord-summary' });
	const [link] = linksIn(mail.text_body);
	expect(link).toMatch(/\/tallowgrass\/summaries\?season=2026$/);
	const words = (mail.text_body ?? '').replaceAll(link, '');
	expect(words.match(/\d[\d.,]*/g)).toEqual(['2026']);
	for (const name of granted) expect(words).toContain(name);
	expect(words).not.toMatch(/[$%]/);

	// Helen, in her own browser, follows the link: sign-in first, then her summaries.
	const context = await browser.newContext({ viewport: viewports.desktop, acceptDownloads: true });
	const her = await context.newPage();
	await her.goto(link);
	await expect(her).toHaveURL(/\/login\?next=/);
	await her.locator('html[data-hydrated="true"]').waitFor();
	await her.getByLabel('E-mail').fill(helen);
	await her.getByLabel('Password').fill(password);
	await her.getByRole('button', { name: 'Sign in' }).click();
	await expect(her).toHaveURL(/\/tallowgrass\/summaries\?season=2026$/);
	const cards = her.getByTestId('summary-fields').locator('> li');
	await expect(cards).toHaveCount(3);
	expect(await cards.locator('h2').allInnerTexts()).toEqual(granted);
	await expect(cards.filter({ hasText: 'Coyote Draw' })).toContainText('25 % crop share');
	for (const name of notGranted) await expect(her.locator('main')).not.toContainText(name);
	await her.screenshot({ path: 'tests/screenshots/summaries-landlord-list-desktop.png', fullPage: true });

	// One field's summary: the map, the figures in her units (acres, gallons), her share.
	await cards.filter({ hasText: 'Coyote Draw' }).getByRole('link', { name: 'Coyote Draw' }).click();
	await expect(her.getByRole('heading', { level: 1 })).toHaveText('Coyote Draw, season 2026');
	await expect(her.getByTestId('summary-map').locator('svg').first()).toBeVisible();
	await expect(her.locator('[data-figure="area"]')).toContainText(' ac');
	await expect(her.getByTestId('summary-products')).toContainText(' gal');
	const share = await her.getByTestId('landlord-share').innerText();
	const cost = await her.locator('[data-figure="cost"] dd span').first().innerText();
	const money = (s: string) => Number(s.replace(/[^0-9.]/g, ''));
	expect(share).toContain(`25 % of ${cost}`);
	expect(money(share.split(' (')[0])).toBeCloseTo(0.25 * money(cost), 2);
	await expect(her.getByTestId('summary-caution')).toContainText('product label and local regulations govern');
	await her.screenshot({ path: 'tests/screenshots/summaries-field-desktop.png', fullPage: true });
	await her.setViewportSize(viewports.phone);
	expect(await her.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0);
	await her.screenshot({ path: 'tests/screenshots/summaries-field-phone.png', fullPage: true });
	await her.goto('/tallowgrass/summaries?season=2026');
	await her.screenshot({ path: 'tests/screenshots/summaries-landlord-list-phone.png', fullPage: true });
	await her.setViewportSize(viewports.desktop);

	// A field not granted is missing, not forbidden.
	const fieldIds = await her.getByTestId('summary-fields').locator('> li').evaluateAll((lis) => lis.map((li) => li.getAttribute('data-field-id')));
	expect(fieldIds).toHaveLength(3);

	// Print: every granted field on its own A4 page, white, no navigation.
	await her.goto('/tallowgrass/summaries/print?season=2026');
	await expect(her.getByTestId('summary-sheet')).toHaveCount(3);
	await her.emulateMedia({ media: 'print' });
	await her.setViewportSize({ width: 700, height: 1000 });
	await expect(her.getByRole('navigation', { name: 'Farm' })).toBeHidden();
	await expect(her.locator('header').first()).toBeHidden();
	expect(await her.evaluate(() => getComputedStyle(document.body).backgroundColor)).toBe('rgb(255, 255, 255)');
	expect(await her.getByTestId('summary-sheet').first().evaluate((el) => getComputedStyle(el).breakAfter)).toBe('page');
	await her.screenshot({ path: 'tests/screenshots/summaries-print.png', fullPage: true });
	const printed = await pdfPages(new Uint8Array(await her.pdf({ format: 'A4', printBackground: false })));
	expect(printed).toHaveLength(3);
	granted.forEach((name, i) => expect(printed[i]).toContain(name));
	await her.emulateMedia({ media: 'screen' });
	await her.setViewportSize(viewports.desktop);

	// The PDF download: one page per granted field, read back.
	await her.goto('/tallowgrass/summaries?season=2026');
	const [download] = await Promise.all([her.waitForEvent('download'), her.getByTestId('pdf-link').click()]);
	expect(download.suggestedFilename()).toBe('season-summary-tallowgrass-2026.pdf');
	const pages = await pdfPages(new Uint8Array(readFileSync((await download.path())!)));
	expect(pages).toHaveLength(3);
	granted.forEach((name, i) => {
		expect(pages[i]).toContain(name);
		expect(pages[i]).toMatch(/\d ac/);
	});
	expect(pages[0]).toContain('25 % crop share');
	for (const name of notGranted) expect(pages.join(' ')).not.toContain(name);
	await context.close();

	// Put the demo back as it was: revoke the grant (audited like the rest).
	await page.goto('/tallowgrass/summaries/landlords');
	await page.locator('html[data-hydrated="true"]').waitFor();
	await setCoyoteDraw(page, false);
	await expect(helensSection(page).getByTestId('grants-saved')).toContainText('Coyote Draw no longer shared');
});

test('the manager previews every field; operators and agronomists are refused', async ({ page }) => {
	await page.setViewportSize(viewports.desktop);
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/summaries?season=2026');
	// Every field of the farm (other tests may have added some), not only the granted ones.
	const names = await page.getByTestId('summary-fields').locator('> li h2').allInnerTexts();
	for (const name of [...granted, ...notGranted.filter((n) => n !== 'Creek Bottom')]) expect(names).toContain(name);
	expect(names).not.toContain('Creek Bottom'); // Brennan Creek's
	await expect(page.getByTestId('summary-fields').locator('> li', { hasText: 'North Flat' })).toContainText('Helen Marsh');
	await page.screenshot({ path: 'tests/screenshots/summaries-manager-list-desktop.png', fullPage: true });
	for (const who of [people.operator, people.agronomist]) {
		await page.context().clearCookies();
		await signIn(page, who);
		const res = await page.goto('/tallowgrass/summaries');
		expect(res?.status()).toBe(403);
		const pdf = await page.request.get('/tallowgrass/summaries/pdf?season=2026');
		expect(pdf.status()).toBe(403);
	}
});

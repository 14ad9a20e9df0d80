// The whole road for a new landlord, all through the mail fake: the manager invites her by
// e-mail, she follows the link and sets her password, the manager grants her two fields (one on a
// crop share, one on cash rent) and e-mails her the season summary; she follows that link, signs
// in, reads a field's summary and prints the season, one field per page. At the end the manager
// removes her, so the demo team is as before for other tests.
import { expect, test, type Page } from '@playwright/test';
import { linksIn, people, signIn, waitForMail } from './helpers';

const fieldsToGrant = ['Home Place', 'Little Draw'];
const hydrated = (page: Page) => page.locator('html[data-hydrated="true"]').waitFor();

async function pdfPageTexts(bytes: Uint8Array): Promise<string[]> {
	const pdfjs = await import('pdfjs-dist/legacy/build/pdf.mjs');
	const pdf = await pdfjs.getDocument({ data: bytes }).promise;
	const pages: string[] = [];
	for (let i = 1; i <= pdf.numPages; i++) {
		const content = await (await pdf.getPage(i)).getTextContent();
		pages.push(content.items.map((x) => ('str' in x ? x.str : '')).join(' '));
	}
	return pages;
}

test('a manager invites a landlord, grants two fields; she joins, reads and prints the season summary, all through the mail', async ({ page, browser }) => {
	test.setTimeout(240_000);
	const email = `ruth.${Date.now().toString(36)}@landowner.example`;
	const name = 'Ruth Okonkwo';
	const newPassword = 'ruths-own-password';

	// 1. The invitation, by mail.
	await signIn(page, people.manager);
	await page.goto('/tallowgrass/team');
	await hydrated(page);
	let since = new Date(Date.now() - 2000);
	await page.getByLabel('E-mail').fill(email);
	await page.locator('form[action="?/invite"] select[name=role]').selectOption('landlord');
	await page.getByRole('button', { name: 'Send invitation' }).click();
	await expect(page.getByRole('status')).toContainText(`Invitation sent to ${email} as landlord`);
	const invitation = await waitForMail(email, { since, kind: 'invitation' });
	expect(invitation.html_body, 'the mail has an HTML part').toContain('/invite/');
	const inviteLink = linksIn(invitation.text_body).find((l) => l.includes('/invite/'))!;

	// 2. Ruth, in her own browser, sets her password; nothing is shared with her yet.
	const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
	const ruth = await context.newPage();
	await ruth.goto(inviteLink);
	await hydrated(ruth);
	await ruth.getByLabel('Your name').fill(name);
	await ruth.getByLabel('Password', { exact: false }).first().fill(newPassword);
	await ruth.getByLabel('Password again').fill(newPassword);
	await ruth.getByRole('button', { name: 'Create account and join' }).click();
	await expect(ruth).toHaveURL(/\/tallowgrass\/summaries/);
	await expect(ruth.locator('main')).not.toContainText('Home Place');
	await ruth.context().clearCookies();

	// 3. The manager grants two fields: one on a 30 % crop share, one on cash rent.
	await page.goto('/tallowgrass/summaries/landlords');
	await hydrated(page);
	const section = page.locator(`[data-testid="landlord"][data-email="${email}"]`);
	await expect(section).toContainText(name);
	const [shared, rented] = fieldsToGrant.map((f) => section.locator(`tr[data-field="${f}"]`));
	await shared.getByRole('checkbox').check();
	await shared.getByRole('radio', { name: 'Crop share' }).check();
	await shared.getByRole('textbox').fill('30');
	await rented.getByRole('checkbox').check();
	await rented.getByRole('radio', { name: 'Cash rent' }).check();
	await section.getByRole('button', { name: /^Save .*fields$/ }).click();
	await expect(section.getByTestId('grants-saved')).toContainText('Home Place granted (30 % crop share)');

	// 4. … and mails her the season summary: a link that needs sign-in, no figures.
	since = new Date(Date.now() - 2000);
	await section.getByTestId('email-form').getByRole('button', { name: 'E-mail the season summary' }).click();
	await expect(section.getByTestId('email-result')).toContainText('season summary link was sent');
	const summaryMail = await waitForMail(email, { since, kind: 'landlord-summary' });
	const [summaryLink] = linksIn(summaryMail.text_body);
	expect(summaryMail.text_body).not.toMatch(/[$%]/);

	// 5. Ruth follows it, signs in with her new password and finds exactly her two fields.
	await ruth.goto(summaryLink);
	await expect(ruth).toHaveURL(/\/login\?next=/);
	await hydrated(ruth);
	await ruth.getByLabel('E-mail').fill(email);
	await ruth.getByLabel('Password').fill(newPassword);
	await ruth.getByRole('button', { name: 'Sign in' }).click();
	await expect(ruth).toHaveURL(/\/tallowgrass\/summaries\?season=\d{4}$/);
	const cards = ruth.getByTestId('summary-fields').locator('> li');
	await expect(cards).toHaveCount(2);
	expect(await cards.locator('h2').allInnerTexts()).toEqual(fieldsToGrant);
	await expect(cards.filter({ hasText: 'Home Place' })).toContainText('30 % crop share');
	for (const other of ['North Flat', 'Schoolhouse', 'Long Hill', 'Coyote Draw']) await expect(ruth.locator('main')).not.toContainText(other);

	// She reads one field: the map, her share; cash rent carries none.
	await cards.filter({ hasText: 'Home Place' }).getByRole('link', { name: 'Home Place' }).click();
	await expect(ruth.getByTestId('summary-map').locator('svg').first()).toBeVisible();
	await expect(ruth.getByTestId('landlord-share')).toContainText('30 % of');
	await ruth.goBack();
	await cards.filter({ hasText: 'Little Draw' }).getByRole('link', { name: 'Little Draw' }).click();
	await expect(ruth.getByTestId('landlord-share')).toContainText('No share under cash rent');
	await ruth.screenshot({ path: 'tests/screenshots/landlord-journey-field-desktop.png', fullPage: true });

	// She prints the season: one field per A4 page.
	const season = new URL(summaryLink).searchParams.get('season');
	await ruth.goto(`/tallowgrass/summaries/print?season=${season}`);
	await expect(ruth.getByTestId('summary-sheet')).toHaveCount(2);
	await ruth.emulateMedia({ media: 'print' });
	const printed = await pdfPageTexts(new Uint8Array(await ruth.pdf({ format: 'A4' })));
	expect(printed).toHaveLength(2);
	fieldsToGrant.forEach((f, i) => expect(printed[i]).toContain(f));
	await context.close();

	// Tidy: the manager removes Ruth; her grants go with her.
	await page.goto('/tallowgrass/team');
	await hydrated(page);
	const row = page.getByTestId('members').locator(`[data-member="${email}"]`);
	await row.getByRole('button', { name: `Remove ${name}` }).click();
	await page.getByRole('dialog').getByRole('button', { name: 'Remove', exact: true }).click();
	await expect(row).toHaveCount(0);
});

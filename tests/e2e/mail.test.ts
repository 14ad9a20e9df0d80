// Mail end to end: what the app sends lands in the e2e server's development outbox (its own fake
// SMTP server); the tests follow the links in it like a person would.
import { expect, test } from '@playwright/test';
import { linksIn, people, signIn, waitForMail } from './helpers';
import { fieldBox, passesCsv } from './logs';

const resetUser = { email: 'reset.tester@test.example', password: 'reset-old-password' }; // tests/e2e/seed-e2e.ts
const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };

test('a forgotten password is reset through the mailed link; other sessions end; the link works once', async ({ page, browser }) => {
	test.setTimeout(90_000);
	// Another device, signed in with the old password.
	const other = await browser.newContext();
	const otherPage = await other.newPage();
	await signIn(otherPage, resetUser.email, resetUser.password);
	await otherPage.goto('/account');
	await expect(otherPage.getByRole('heading', { level: 1, name: 'Account' })).toBeVisible();

	await page.setViewportSize(viewports.phone);
	await page.goto('/login');
	await page.locator('html[data-hydrated="true"]').waitFor();
	await page.getByRole('link', { name: 'Forgot your password?' }).click();
	await expect(page).toHaveURL(/\/reset-password$/);
	await page.screenshot({ path: 'tests/screenshots/reset-request-phone.png', fullPage: true });
	await page.setViewportSize(viewports.desktop);
	await page.screenshot({ path: 'tests/screenshots/reset-request-desktop.png', fullPage: true });

	// An unknown address gets the very same sentence (and no mail).
	await page.getByLabel('E-mail').fill('nobody-here@test.example');
	await page.getByRole('button', { name: 'Send me a link' }).click();
	const sentence = page.getByRole('status');
	await expect(sentence).toHaveText('If an account uses nobody-here@test.example, a link to choose a new password is on its way there. It works once, for an hour.');

	await page.goto('/reset-password');
	const since = new Date(Date.now() - 2000);
	await page.getByLabel('E-mail').fill(resetUser.email);
	await page.getByRole('button', { name: 'Send me a link' }).click();
	await expect(sentence).toHaveText(`If an account uses ${resetUser.email}, a link to choose a new password is on its way there. It works once, for an hour.`);
	await page.screenshot({ path: 'tests/screenshots/reset-sent-desktop.png', fullPage: true });

	const mail = await waitForMail(resetUser.email, { since, kind: 'password-reset' });
	expect(mail.subject).toBe('Reset your Patchbook password');
	const link = linksIn(mail.text_body).find((l) => l.includes('/reset-password/'))!;
	expect(link).toMatch(/\/reset-password\/[A-Za-z0-9_-]{43}$/);

	await page.setViewportSize(viewports.phone);
	await page.goto(link);
	await expect(page.getByRole('heading', { name: 'Choose a new password' })).toBeVisible();
	await page.screenshot({ path: 'tests/screenshots/reset-choose-phone.png', fullPage: true });
	await page.setViewportSize(viewports.desktop);
	await page.screenshot({ path: 'tests/screenshots/reset-choose-desktop.png', fullPage: true });
	// Too short, then two that differ: sentences, and the link still works.
	await page.getByLabel('New password (at least 10 characters)').fill('short');
	await page.getByLabel('New password again').fill('short');
	await page.getByLabel('New password (at least 10 characters)').evaluate((el) => el.removeAttribute('minlength'));
	await page.getByRole('button', { name: 'Set new password' }).click();
	await expect(page.getByRole('alert')).toHaveText('New password: Use at least 10 characters.');
	await page.getByLabel('New password (at least 10 characters)').fill('a brand new password');
	await page.getByLabel('New password again').fill('a brand new passwort');
	await page.getByRole('button', { name: 'Set new password' }).click();
	await expect(page.getByRole('alert')).toHaveText('The two passwords differ.');
	await page.getByLabel('New password (at least 10 characters)').fill('a brand new password');
	await page.getByLabel('New password again').fill('a brand new password');
	await page.getByRole('button', { name: 'Set new password' }).click();

	// Signed in here, on the account page.
	await expect(page).toHaveURL(/\/account\?password=reset$/);
	await expect(page.getByText('Your new password is set. You are signed in here; every other device has been signed out.')).toBeVisible();
	await page.screenshot({ path: 'tests/screenshots/reset-account-desktop.png', fullPage: true });
	await page.setViewportSize(viewports.phone);
	await page.screenshot({ path: 'tests/screenshots/reset-account-phone.png', fullPage: true });
	await page.setViewportSize(viewports.desktop);

	// The other device's session has ended.
	await otherPage.goto('/account');
	await expect(otherPage).toHaveURL(/\/login\?next=%2Faccount/);
	await other.close();

	// The same link again is refused with a way to ask again, never an error page.
	await page.goto(link);
	await expect(page.getByRole('heading', { name: 'This link no longer works' })).toBeVisible();
	await page.screenshot({ path: 'tests/screenshots/reset-used-desktop.png', fullPage: true });
	await page.setViewportSize(viewports.phone);
	await page.screenshot({ path: 'tests/screenshots/reset-used-phone.png', fullPage: true });
	await page.getByRole('link', { name: 'Ask for a new link' }).click();
	await expect(page).toHaveURL(/\/reset-password$/);

	// The old password no longer signs in; the new one does.
	await page.context().clearCookies();
	await page.goto('/login');
	await page.locator('html[data-hydrated="true"]').waitFor();
	await page.getByLabel('E-mail').fill(resetUser.email);
	await page.getByLabel('Password').fill(resetUser.password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page.getByRole('alert')).toHaveText('E-mail or password is wrong.');
	await signIn(page, resetUser.email, 'a brand new password');
});

test('an operator who opted out uploads a log; the manager reads the processed mail in the development outbox', async ({ page, browser }) => {
	test.setTimeout(150_000);
	// The operator switches upload mail off on the account page; the setting survives a reload.
	await signIn(page, people.operator);
	await page.goto('/account');
	const box = page.getByLabel('Mail me about processed uploads');
	await expect(box).toBeChecked();
	await box.uncheck();
	await page.getByRole('button', { name: 'Save mail setting' }).click();
	await expect(page.getByText('Mail setting saved.')).toBeVisible();
	await page.reload();
	await expect(page.getByLabel('Mail me about processed uploads')).not.toBeChecked();
	await page.screenshot({ path: 'tests/screenshots/operator-account-mail-desktop.png', fullPage: true });

	try {
		const since = new Date(Date.now() - 2000);
		const day = '2026-09-17';
		await page.setViewportSize(viewports.phone);
		await page.goto('/tallowgrass/uploads');
		const { csv } = passesCsv(await fieldBox(page.request, 'tallowgrass', 'North Flat'), { day });
		const fileName = `north-flat-notify-${day}.csv`;
		await page.getByTestId('upload-input').setInputFiles({ name: fileName, mimeType: 'text/csv', buffer: Buffer.from(csv) });
		await page.getByRole('link', { name: 'Map its columns' }).click();
		await page.getByLabel('Machine').selectOption({ label: 'Spot sprayer 36.6 m (144 nozzles)' });
		await page.getByLabel('Tank mix').selectOption({ label: 'Fallow knockdown' });
		await page.getByRole('button', { name: 'Process this log' }).click();
		await expect(page.getByTestId('upload-status')).toContainText('Processed', { timeout: 60_000 });
		const uploadPath = new URL(page.url()).pathname;

		// The manager's mail, as the worker sent it.
		const mail = await waitForMail(people.manager, { since, kind: 'upload-done' });
		expect(mail.subject).toBe(`Processed: ${fileName}`);
		expect(mail.text_body).toMatch(new RegExp(`North Flat on ${day}: [\\d.,]+ ha covered, [\\d.,]+ ha sprayed \\(50 % of the area covered\\)`));

		// The manager reads it in the development outbox, from the farm's navigation.
		const manager = await browser.newContext({ viewport: viewports.desktop });
		const mp = await manager.newPage();
		await signIn(mp, people.manager);
		await mp.goto('/tallowgrass');
		await mp.getByRole('navigation', { name: 'Farm' }).getByRole('link', { name: 'Outbox (development)' }).click();
		await expect(mp.getByTestId('dev-outbox-notice')).toHaveText('Development outbox: mail the app would have sent; nothing left this machine.');
		const rows = mp.getByTestId('outbox-list').getByRole('row', { name: new RegExp(`Processed: ${fileName}`) });
		await expect(rows).toHaveCount(1); // the manager's only: the operator opted out
		await expect(rows).toContainText(people.manager);
		await expect(rows).toContainText('upload-done');
		await mp.screenshot({ path: 'tests/screenshots/manager-outbox-desktop.png', fullPage: true });
		// On a phone the list is one card per message.
		await mp.setViewportSize(viewports.phone);
		await expect(mp.getByTestId('outbox-cards').getByRole('listitem').filter({ hasText: `Processed: ${fileName}` })).toHaveCount(1);
		await mp.screenshot({ path: 'tests/screenshots/manager-outbox-phone.png', fullPage: true });
		await mp.setViewportSize(viewports.desktop);

		await rows.getByRole('link', { name: `Processed: ${fileName}` }).click();
		await expect(mp.getByRole('heading', { level: 1, name: `Processed: ${fileName}` })).toBeVisible();
		const text = mp.getByTestId('mail-text');
		await expect(text).toContainText('(50 % of the area covered)');
		// The HTML part is shown in a frame where nothing runs.
		const frame = mp.getByTestId('mail-html');
		await expect(frame).toHaveAttribute('sandbox', '');
		await expect(mp.frameLocator('[data-testid="mail-html"]').getByRole('link', { name: 'Open the upload' })).toBeVisible();
		await mp.screenshot({ path: 'tests/screenshots/manager-outbox-message-desktop.png', fullPage: true });
		await mp.setViewportSize(viewports.phone);
		await mp.screenshot({ path: 'tests/screenshots/manager-outbox-message-phone.png', fullPage: true });

		// The link in the mail opens the upload's page.
		const link = linksIn(await text.textContent()).find((l) => l.includes('/uploads/'))!;
		expect(new URL(link).pathname).toBe(uploadPath);
		await mp.goto(link);
		await expect(mp.getByTestId('upload-status')).toContainText('Processed');
		await manager.close();
	} finally {
		// Back on for the other tests.
		await page.goto('/account');
		await page.getByLabel('Mail me about processed uploads').check();
		await page.getByRole('button', { name: 'Save mail setting' }).click();
		await expect(page.getByText('Mail setting saved.')).toBeVisible();
	}
	await page.reload();
	await expect(page.getByLabel('Mail me about processed uploads')).toBeChecked();
});

test('agronomists have no outbox: no link, and the page is refused', async ({ page }) => {
	await signIn(page, people.agronomist);
	await page.goto('/tallowgrass');
	await expect(page.getByRole('navigation', { name: 'Farm' }).getByRole('link', { name: 'Outbox (development)' })).toHaveCount(0);
	const response = await page.goto('/tallowgrass/outbox');
	expect(response?.status()).toBe(403);
});

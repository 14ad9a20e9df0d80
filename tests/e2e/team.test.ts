// The team page end to end: an invitation mailed and followed like a person would, a new account
// landing in the farm, the used link refusing a second use, a role change, a removal that ends
// the removed person's open session in their own browser, the 403s, and an existing account
// joining with its password. Screenshots of the team, accept and audit pages.
import { expect, test, type Browser, type Page } from '@playwright/test';
import { linksIn, password, people, signIn, waitForMail } from './helpers';

const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };
const hydrated = (page: Page) => page.locator('html[data-hydrated="true"]').waitFor();

async function shoot(page: Page, name: string) {
	for (const [size, viewport] of Object.entries(viewports)) {
		await page.setViewportSize(viewport);
		const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
		expect(overflow, `horizontal overflow on ${name} (${size})`).toBeLessThanOrEqual(0);
		await page.screenshot({ path: `tests/screenshots/${name}-${size}.png`, fullPage: true });
	}
	await page.setViewportSize(viewports.desktop);
}

async function invite(page: Page, email: string, role: string) {
	const since = new Date(Date.now() - 2000);
	await page.goto('/tallowgrass/team');
	await hydrated(page);
	await page.getByLabel('E-mail').fill(email);
	await page.locator('form[action="?/invite"] select[name=role]').selectOption(role);
	await page.getByRole('button', { name: 'Send invitation' }).click();
	await expect(page.getByRole('status')).toContainText(`Invitation sent to ${email} as ${role}`);
	const mail = await waitForMail(email, { since, kind: 'invitation' });
	const link = linksIn(mail.text_body).find((l) => l.includes('/invite/'));
	expect(link, 'the mail carries the invitation link').toBeTruthy();
	return { mail, link: link! };
}

async function freshPage(browser: Browser) {
	const context = await browser.newContext();
	return { context, page: await context.newPage() };
}

test('a new agronomist is invited, joins, changes role and is removed; their open session ends', async ({ page, browser }) => {
	const email = `ann.${Date.now().toString(36)}@fieldhands.example`;
	await signIn(page, people.manager);
	const { mail, link } = await invite(page, email, 'agronomist');
	expect(mail.subject).toMatch(/^Mara Lindqvist invited you to Tallowgrass Farm on Patchbook$/);
	expect(mail.text_body).toContain('as an agronomist');
	await expect(page.getByTestId('pending').locator(`[data-invitation="${email}"]`)).toContainText('Agronomist');
	await shoot(page, 'team-manager');

	// Ann, in her own browser, follows the link from the mail.
	const ann = await freshPage(browser);
	await ann.page.goto(link);
	await hydrated(ann.page);
	await expect(ann.page.getByRole('heading', { name: 'Join Tallowgrass' })).toBeVisible();
	await expect(ann.page.getByText('Agronomist', { exact: true })).toBeVisible();
	await shoot(ann.page, 'invite-new-account');
	await ann.page.getByLabel('Your name').fill('Ann Fielding');
	await ann.page.getByLabel('Password', { exact: false }).first().fill('ann-secret-pass');
	await ann.page.getByLabel('Password again').fill('not the same one');
	await ann.page.getByRole('button', { name: 'Create account and join' }).click();
	await expect(ann.page.getByRole('alert')).toContainText('The two passwords differ');
	await ann.page.getByLabel('Password', { exact: false }).first().fill('ann-secret-pass');
	await ann.page.getByLabel('Password again').fill('ann-secret-pass');
	await ann.page.getByRole('button', { name: 'Create account and join' }).click();
	await expect(ann.page).toHaveURL(/\/tallowgrass$/);
	await expect(ann.page.getByRole('navigation', { name: 'Farm' }).getByRole('link', { name: 'Map' })).toBeVisible();

	// The same link again: used.
	const again = await freshPage(browser);
	const response = await again.page.goto(link);
	expect(response?.status()).toBe(200);
	await expect(again.page.getByTestId('dead-link')).toContainText('already been used');
	await shoot(again.page, 'invite-used');
	await again.context.close();

	// The manager makes her an operator, then removes her.
	await page.goto('/tallowgrass/team');
	await hydrated(page);
	const row = page.getByTestId('members').locator(`[data-member="${email}"]`);
	await expect(row).toContainText('Ann Fielding');
	await row.getByLabel('Role of Ann Fielding').selectOption('operator');
	await row.getByRole('button', { name: 'Change' }).click();
	await expect(page.getByRole('status')).toContainText('Ann Fielding is now an operator');
	await row.getByRole('button', { name: 'Remove Ann Fielding' }).click();
	const dialog = page.getByRole('dialog');
	await expect(dialog).toContainText('Remove Ann Fielding from Tallowgrass Farm?');
	await dialog.getByRole('button', { name: 'Remove', exact: true }).click();
	await expect(page.getByRole('status')).toContainText('Ann Fielding is no longer a member');
	await expect(row).toHaveCount(0);

	// Ann's open page: the next request finds no session and goes to sign-in.
	await ann.page.goto('/tallowgrass/map');
	await expect(ann.page).toHaveURL(/\/login/);
	const api = await ann.context.request.get('/api/farms/tallowgrass/fields');
	expect(api.status()).toBe(401);
	await ann.context.close();

	// The last manager cannot step down.
	const mara = page.getByTestId('members').locator(`[data-member="${people.manager}"]`);
	await mara.getByRole('combobox').selectOption('agronomist');
	await mara.getByRole('button', { name: 'Change' }).click();
	await expect(page.getByRole('alert')).toContainText('is the last manager of this farm');

	// The audit log tells it as sentences, and the CSV holds the same filtered entries.
	await page.getByRole('link', { name: 'Audit log' }).click();
	await expect(page.getByRole('heading', { name: 'Audit log' })).toBeVisible();
	await hydrated(page);
	await page.getByLabel('Kind of action').selectOption('team');
	await expect(page).toHaveURL(/kind=team/);
	const entries = page.getByTestId('audit-entries');
	await expect(entries.locator('li').first()).toContainText('removed Ann Fielding (operator) from the farm');
	await expect(entries).toContainText('changed Ann Fielding’s role from agronomist to operator');
	await shoot(page, 'team-audit');
	const csv = await page.request.get(await page.getByRole('link', { name: 'Download CSV' }).getAttribute('href').then((h) => h!));
	expect(csv.headers()['content-type']).toContain('text/csv');
	const text = await csv.text();
	expect(text.split('\r\n')[0]).toBe('time_utc,person,email,action,what_happened,detail_json');
	expect(text).toContain('membership.removed');
	expect(text).not.toContain('member.invited'); // filtered to team changes
});

test('an operator gets 403 on the team page, its actions, the audit log and the API', async ({ page, baseURL }) => {
	await signIn(page, people.operator);
	expect((await page.goto('/tallowgrass/team'))?.status()).toBe(403);
	expect((await page.goto('/tallowgrass/team/audit'))?.status()).toBe(403);
	for (const action of ['invite', 'role', 'remove', 'resend', 'revoke']) {
		const r = await page.request.post(`/tallowgrass/team?/${action}`, {
			headers: { origin: baseURL!, accept: 'application/json', 'x-sveltekit-action': 'true' },
			form: { email: 'x@y.example', role: 'manager', user: 'u-mara', invitation: '00000000-0000-0000-0000-000000000000' }
		});
		expect([action, r.status()]).toEqual([action, 403]);
	}
	expect((await page.request.get('/tallowgrass/team/audit/csv')).status()).toBe(403);
	expect((await page.request.get('/api/farms/tallowgrass/team')).status()).toBe(403);
});

test('an existing account (another farm’s manager) joins as agronomist with his password', async ({ page, browser }) => {
	await signIn(page, people.manager);
	const { link } = await invite(page, people.otherFarmManager, 'agronomist');

	// Someone else signed in on that browser is told so and offered to sign out.
	const sam = await freshPage(browser);
	await signIn(sam.page, people.operator);
	await sam.page.goto(link);
	await expect(sam.page.getByTestId('someone-else')).toContainText('this invitation is for tom@brennancreek.example');
	await shoot(sam.page, 'invite-signed-in-as-other');
	await sam.page.getByRole('button', { name: 'Sign out' }).click();
	await expect(sam.page.getByText('Join with your existing account')).toBeVisible();
	await sam.context.close();

	const tom = await freshPage(browser);
	await tom.page.goto(link);
	await hydrated(tom.page);
	await expect(tom.page.getByText('Join with your existing account')).toBeVisible();
	await shoot(tom.page, 'invite-existing-account');
	await tom.page.getByLabel('Password').fill('not his password');
	await tom.page.getByRole('button', { name: 'Join Tallowgrass' }).click();
	await expect(tom.page.getByRole('alert')).toContainText('That password is wrong');
	await tom.page.getByLabel('Password').fill(password);
	await tom.page.getByRole('button', { name: 'Join Tallowgrass' }).click();
	await expect(tom.page).toHaveURL(/\/tallowgrass$/);
	await tom.context.close();

	// Leave the demo team as it was: Tom goes again (other tests expect him outside Tallowgrass).
	await page.goto('/tallowgrass/team');
	await hydrated(page);
	const row = page.getByTestId('members').locator(`[data-member="${people.otherFarmManager}"]`);
	await expect(row.getByRole('combobox')).toHaveValue('agronomist');
	await row.getByRole('button', { name: /^Remove / }).click();
	await page.getByRole('dialog').getByRole('button', { name: 'Remove', exact: true }).click();
	await expect(row).toHaveCount(0);
});

import { expect, test } from '@playwright/test';
import { password, people, signIn } from './helpers';

const navFor = {
	// The e2e server runs with the development outbox on (scripts/e2e-server.sh).
	manager: ['Overview', 'Map', 'Fields', 'Uploads', 'Records', 'Calibration', 'Savings', 'Catalogue', 'Team', 'Season summaries', 'Outbox (development)'],
	agronomist: ['Overview', 'Map', 'Fields', 'Uploads', 'Records', 'Calibration', 'Catalogue'],
	operator: ['Overview', 'Map', 'Fields', 'Uploads', 'Records', 'Calibration', 'Catalogue'],
	landlord: ['Season summaries']
};

for (const role of ['manager', 'agronomist', 'operator', 'landlord'] as const) {
	test(`${role} signs in and sees the areas the role may open`, async ({ page }) => {
		await signIn(page, people[role]);
		// With no farm used before, the first farm by name opens (the agronomist's is Brennan Creek).
		const landing = { manager: '/tallowgrass', agronomist: '/brennan-creek', operator: '/tallowgrass', landlord: '/tallowgrass/summaries' };
		await expect(page).toHaveURL(landing[role]);
		await page.goto(role === 'landlord' ? '/tallowgrass/summaries' : '/tallowgrass');
		const nav = page.getByRole('navigation', { name: 'Farm' }).getByRole('link');
		await expect(nav).toHaveText(navFor[role]);
	});
}

test('forbidden pages answer 403 with a plain page, not a redirect', async ({ page }) => {
	const cases = [
		[people.operator, '/tallowgrass/team'],
		[people.operator, '/tallowgrass/savings'],
		[people.agronomist, '/tallowgrass/team'],
		[people.landlord, '/tallowgrass/fields'],
		[people.landlord, '/tallowgrass/map']
	] as const;
	for (const [email, path] of cases) {
		await page.context().clearCookies();
		await signIn(page, email);
		const response = await page.goto(path);
		expect(response?.status(), `${email} ${path}`).toBe(403);
		await expect(page.getByRole('heading', { name: 'Not allowed' })).toBeVisible();
	}
});

test('API routes answer 401 without a session and 403 or 404 JSON beyond the role or farm', async ({ page, request }) => {
	const anonymous = await request.get('/api/me');
	expect(anonymous.status()).toBe(401);
	expect((await anonymous.json()).message).toBe('Sign in first.');

	await signIn(page, people.operator);
	const team = await page.request.get('/api/farms/tallowgrass/team', { headers: { accept: 'application/json' } });
	expect(team.status()).toBe(403);
	expect(await team.json()).toEqual({ message: 'Your role in this farm does not allow this.' });

	await page.context().clearCookies();
	await signIn(page, people.landlord);
	const fields = await page.request.get('/api/farms/tallowgrass/fields');
	expect(fields.status()).toBe(200);
	expect((await fields.json()).fields.map((f: { name: string }) => f.name)).toEqual(['North Flat', 'Schoolhouse']);

	await page.context().clearCookies();
	await signIn(page, people.otherFarmManager);
	const otherFarm = await page.request.get('/api/farms/tallowgrass/fields');
	expect(otherFarm.status()).toBe(404);
	expect(JSON.stringify(await otherFarm.json())).not.toContain('North Flat');
	expect((await page.goto('/tallowgrass'))?.status()).toBe(404);
});

test('a page without a session sends you to sign in and back', async ({ page }) => {
	await page.goto('/tallowgrass/fields');
	await expect(page).toHaveURL('/login?next=%2Ftallowgrass%2Ffields');
	await page.getByLabel('E-mail').fill(people.manager);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).toHaveURL('/tallowgrass/fields');
	await expect(page.getByRole('cell', { name: 'Coyote Draw' })).toBeVisible();
});

test('a wrong password says so without telling whether the e-mail exists', async ({ page }) => {
	for (const email of [people.manager, 'nobody-here@test.example']) {
		await page.goto('/login');
		await page.getByLabel('E-mail').fill(email);
		await page.getByLabel('Password').fill('not the password');
		await page.getByRole('button', { name: 'Sign in' }).click();
		await expect(page.getByRole('alert')).toHaveText('E-mail or password is wrong.');
		await expect(page).toHaveURL(/\/login/);
	}
});

test('after five failures the account is locked, even for the right password', async ({ page }) => {
	for (let i = 0; i < 5; i++) {
		await page.goto('/login');
		await page.getByLabel('E-mail').fill('lockout@test.example');
		await page.getByLabel('Password').fill(`wrong ${i}`);
		await page.getByRole('button', { name: 'Sign in' }).click();
		await expect(page.getByRole('alert')).toHaveText('E-mail or password is wrong.');
	}
	await page.getByLabel('E-mail').fill('lockout@test.example');
	await page.getByLabel('Password').fill('lockout-password');
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page.getByRole('alert')).toContainText('Too many failed sign-ins. Try again in');
	await expect(page).toHaveURL(/\/login/);
});

test('the session cookie is httpOnly and SameSite=Lax; sign-out ends the session', async ({ page }) => {
	await signIn(page, people.manager);
	const cookie = (await page.context().cookies()).find((c) => c.name === 'auth_session');
	expect(cookie?.httpOnly).toBe(true);
	expect(cookie?.sameSite).toBe('Lax');
	expect(cookie?.secure).toBe(false); // served over plain http on loopback here

	await page.getByLabel('Account').click();
	await page.getByRole('button', { name: 'Sign out' }).click();
	await expect(page).toHaveURL('/login');
	// The old token no longer opens anything, even if replayed.
	await page.context().addCookies([{ ...cookie!, expires: -1 }]);
	await page.goto('/tallowgrass');
	await expect(page).toHaveURL(/\/login\?next=/);
});

test('an agronomist in two farms switches farm from the header', async ({ page }) => {
	await signIn(page, people.agronomist);
	await page.goto('/tallowgrass');
	await page.getByLabel('Switch farm').click();
	await page.getByRole('link', { name: /Brennan Creek Farm/ }).click();
	await expect(page).toHaveURL('/brennan-creek');
	await expect(page.getByRole('heading', { name: 'Brennan Creek Farm' })).toBeVisible();
	await expect(page.getByTestId('field-count')).toHaveText('2');
	// The farm used last opens next time.
	await page.goto('/');
	await expect(page).toHaveURL('/brennan-creek');
});

test('Noto Sans ships with the app and no request leaves the machine', async ({ page }) => {
	const offHost: string[] = [];
	page.on('request', (r) => {
		const host = new URL(r.url()).hostname;
		if (host !== '127.0.0.1' && r.url().startsWith('http')) offHost.push(r.url());
	});
	await signIn(page, people.manager);
	await page.evaluate(() => document.fonts.ready);
	expect(await page.evaluate(() => document.fonts.check('16px "Noto Sans"'))).toBe(true);
	const family = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
	expect(family).toContain('Noto Sans');
	expect(offHost).toEqual([]);
});

test('account: units and password can be changed', async ({ page }) => {
	await signIn(page, people.otherFarmManager);
	await page.goto('/account');
	await page.getByLabel(/US customary/).check();
	await page.getByRole('button', { name: 'Save units' }).click();
	await expect(page.getByText('Units saved.')).toBeVisible();
	await page.reload();
	await expect(page.getByLabel(/US customary/)).toBeChecked();

	await page.getByLabel('Current password').fill('wrong');
	await page.getByLabel(/^New password \(/).fill('another-long-password');
	await page.getByLabel('New password again').fill('another-long-password');
	await page.getByRole('button', { name: 'Change password' }).click();
	await expect(page.getByRole('alert')).toHaveText('Your current password is not right.');
});

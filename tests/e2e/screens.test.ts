// Screenshots of every page each role can open, on a desktop and a phone, for people to look at.
// Each also checks the page rendered its heading and nothing overflows the phone's width.
import { expect, test } from '@playwright/test';
import { people, signIn } from './helpers';

const pages = {
	manager: ['', '/map', '/fields', '/uploads', '/records', '/calibration', '/savings', '/catalogue', '/team', '/summaries', '/outbox'],
	agronomist: ['', '/catalogue', '/records', '/calibration'],
	operator: ['', '/uploads', '/records', '/calibration', '/catalogue'],
	landlord: ['/summaries']
} as const;
const viewports = { desktop: { width: 1280, height: 800 }, phone: { width: 390, height: 844 } };

for (const [name, size] of Object.entries(viewports)) {
	for (const [role, paths] of Object.entries(pages)) {
		test(`${role} pages on a ${name}`, async ({ page }) => {
			await page.setViewportSize(size);
			await signIn(page, people[role as keyof typeof pages]);
			for (const path of [...paths, '/account']) {
				await page.goto(path === '/account' ? '/account' : `/tallowgrass${path}`);
				await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
				const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
				expect(overflow, `horizontal overflow on ${path}`).toBeLessThanOrEqual(0);
				const file = `${role}-${(path || '/overview').slice(1)}-${name}.png`;
				await page.screenshot({ path: `tests/screenshots/${file}`, fullPage: true });
			}
		});
	}
}

test('sign-in page on a phone', async ({ page }) => {
	await page.setViewportSize(viewports.phone);
	await page.goto('/login');
	await page.screenshot({ path: 'tests/screenshots/login-phone.png' });
	await page.setViewportSize(viewports.desktop);
	await page.screenshot({ path: 'tests/screenshots/login-desktop.png' });
	await expect(page.getByRole('button', { name: 'Sign in' })).toBeVisible();
});

test('the demo farm tells its three-season story: overview and a field page', async ({ page }) => {
	await page.setViewportSize(viewports.desktop);
	await signIn(page, people.manager);
	for (const season of [2024, 2025, 2026]) {
		await page.goto(`/tallowgrass?season=${season}`);
		// Ten fields, each sprayed in the spring burndown of every season.
		await expect(page.getByTestId('season-figures').locator('tbody tr')).toHaveCount(10);
		await page.screenshot({ path: `tests/screenshots/demo-overview-${season}-desktop.png`, fullPage: true });
	}
	await page.goto('/tallowgrass/fields');
	await page.getByRole('link', { name: 'Coyote Draw' }).click();
	// Coyote Draw: a spring pass each season and the June residual patch programme in 2025.
	await expect(page.getByTestId('field-applications').locator('tbody tr')).toHaveCount(4);
	await page.screenshot({ path: 'tests/screenshots/demo-field-coyote-draw-desktop.png', fullPage: true });
	await page.setViewportSize(viewports.phone);
	await page.screenshot({ path: 'tests/screenshots/demo-field-coyote-draw-phone.png', fullPage: true });
	await page.goto('/tallowgrass');
	await page.screenshot({ path: 'tests/screenshots/demo-overview-phone.png', fullPage: true });
});

import { chromium } from '@playwright/test';
const base = 'http://127.0.0.1:4186';
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox', '--enable-unsafe-swiftshader', '--disable-background-networking'] });
const ctx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
const page = await ctx.newPage();
await page.goto(base + '/login');
await page.getByLabel('E-mail').fill('mara@tallowgrass.example');
await page.getByLabel('Password').fill('patchbook-demo');
await page.getByRole('button', { name: 'Sign in' }).click();
await page.waitForURL(/tallowgrass/);
for (const mode of ['normal', 'nocells', 'normal', 'nocells', 'nofields', 'nosummary']) {
	const p2 = await ctx.newPage();
	if (mode === 'nocells') await p2.route(/tiles\/cells/, (r) => r.fulfill({ status: 204 }));
	if (mode === 'nosummary') await p2.route(/map\/summary/, () => {});
	const t0 = Date.now();
	await p2.goto(base + '/tallowgrass/map');
	await p2.waitForSelector('[data-map-idle="true"]', { timeout: 60000 });
	console.log(mode, 'idle at', Date.now() - t0);
	await p2.close();
}
await browser.close();

import { defineConfig } from '@playwright/test';

const port = Number(process.env.E2E_PORT ?? 4173);

export default defineConfig({
	testDir: 'tests/e2e',
	// One browser at a time: software WebGL makes each Chromium heavy on two cores.
	workers: 1,
	timeout: 60_000,
	expect: { timeout: 10_000 },
	use: {
		baseURL: `http://127.0.0.1:${port}`,
		browserName: 'chromium',
		launchOptions: {
			executablePath: '/usr/bin/chromium',
			args: [
				'--no-sandbox',
				'--disable-background-networking',
				'--disable-component-update',
				'--disable-sync',
				'--no-first-run',
				'--disable-quic',
				'--enable-unsafe-swiftshader'
			]
		}
	},
	webServer: {
		command: 'bash scripts/e2e-server.sh',
		url: `http://127.0.0.1:${port}/api/health`,
		reuseExistingServer: !process.env.CI,
		timeout: 600_000, // the first start loads the demo farm through the real pipeline
		stdout: 'pipe'
	}
});

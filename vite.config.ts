import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	test: {
		include: ['src/**/*.test.ts'],
		globalSetup: ['./tests/global-setup.ts'],
		// Integration tests share one database; running files one at a time keeps them apart.
		fileParallelism: false,
		testTimeout: 20_000,
		hookTimeout: 60_000
	}
});

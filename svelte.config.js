import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

/**
 * Content-Security-Policy, sent by SvelteKit itself. mode 'auto': nonces on server-rendered
 * pages, hashes on prerendered ones, so SvelteKit's inline bootstrap script runs and no other
 * inline script does. Why each directive: DEVELOPERS.md, "Security".
 */
const csp = {
	mode: 'auto',
	directives: {
		'default-src': ['self'],
		'script-src': ['self'],
		// Svelte renders `style="…"` attributes on the server (bar widths, legend swatches,
		// map heights) and the dev outbox's srcdoc iframe, which inherits this policy, shows
		// mail HTML whose styles are inline attributes: neither can carry a nonce or a hash
		// (hashes of attributes need 'unsafe-hashes' per value), so inline styles are allowed.
		// Scripts are not: an injected style cannot run code.
		'style-src': ['self', 'unsafe-inline'],
		// MapLibre decodes tiles and sprites into blob: and data: images.
		'img-src': ['self', 'data:', 'blob:'],
		'font-src': ['self'],
		'connect-src': ['self'],
		// MapLibre's web worker is a file from 'self' (setWorkerUrl); blob: for the workers
		// MapLibre and terra-draw may create from code.
		'worker-src': ['self', 'blob:'],
		'child-src': ['self', 'blob:'],
		// Only the outbox's srcdoc iframe (about:srcdoc inherits this policy); nothing framed from elsewhere.
		'frame-src': ['self'],
		'frame-ancestors': ['none'],
		'object-src': ['none'],
		'base-uri': ['self'],
		'form-action': ['self'],
		'manifest-src': ['self']
	}
};

/** @type {import('@sveltejs/kit').Config} */
export default {
	preprocess: vitePreprocess(),
	kit: {
		adapter: adapter(),
		// CSRF: SvelteKit's default origin check (no trustedOrigins) refuses form posts from
		// another origin; src/hooks.server.ts refuses every other cross-site write.
		csp
	}
};

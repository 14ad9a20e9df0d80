// Two checks every request passes in hooks.server.ts, kept pure so a unit test can try them.

const writeMethods = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * Why a write request must be refused as cross-site, or null when it may go on.
 * SvelteKit's own origin check only covers form content types (urlencoded, multipart,
 * text/plain); this covers every write — JSON, octet-stream uploads, no content type —
 * so no endpoint depends on CORS preflights alone. A browser always sends Origin on a
 * write; a request with neither Origin nor Sec-Fetch-Site comes from a script or tool
 * that holds the session itself, which no other site can make a browser do.
 */
export function crossSiteWriteRefusal(method: string, headers: Headers, ownOrigin: string): string | null {
	if (!writeMethods.has(method.toUpperCase())) return null;
	const origin = headers.get('origin');
	if (origin !== null && origin !== ownOrigin) return `Cross-site ${method} requests are forbidden`;
	// Sec-Fetch-Site is set by the browser and cannot be forged by page script; a sibling
	// subdomain ('same-site') is another site as far as this app is concerned.
	const site = headers.get('sec-fetch-site');
	if (site === 'cross-site' || site === 'same-site') return `Cross-site ${method} requests are forbidden`;
	return null;
}

/** Headers added to every response (the CSP itself comes from kit.csp in svelte.config.js). */
export function securityHeaders(https: boolean): Record<string, string> {
	const headers: Record<string, string> = {
		'X-Content-Type-Options': 'nosniff',
		'Referrer-Policy': 'same-origin',
		// Older browsers that ignore CSP frame-ancestors.
		'X-Frame-Options': 'DENY',
		// A window opened from elsewhere gets no handle on ours, and ours none on it.
		'Cross-Origin-Opener-Policy': 'same-origin',
		// No page uses these; off, so an injected script or frame cannot ask for them either.
		// (Photos come through a file input, which needs no camera permission.)
		'Permissions-Policy': 'camera=(), microphone=(), geolocation=(), payment=(), usb=(), serial=(), bluetooth=()'
	};
	// Only over https: HSTS on plain http is ignored by browsers and would mislead.
	if (https) headers['Strict-Transport-Security'] = 'max-age=31536000; includeSubDomains';
	return headers;
}

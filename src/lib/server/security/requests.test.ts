import { describe, expect, it } from 'vitest';
import { crossSiteWriteRefusal, securityHeaders } from './requests';

const own = 'https://patchbook.farm.example';
const h = (init: Record<string, string>) => new Headers(init);

describe('crossSiteWriteRefusal', () => {
	it('refuses a write from another origin, from a sandboxed frame (Origin null) and from a sibling site', () => {
		for (const method of ['POST', 'PUT', 'PATCH', 'DELETE', 'post']) {
			expect(crossSiteWriteRefusal(method, h({ origin: 'https://evil.example' }), own), method).toMatch(/Cross-site/);
			expect(crossSiteWriteRefusal(method, h({ origin: 'null' }), own), method).toMatch(/Cross-site/);
			expect(crossSiteWriteRefusal(method, h({ 'sec-fetch-site': 'cross-site' }), own), method).toMatch(/Cross-site/);
			expect(crossSiteWriteRefusal(method, h({ origin: own, 'sec-fetch-site': 'same-site' }), own), method).toMatch(/Cross-site/);
			// Same host, other scheme or port: another origin.
			expect(crossSiteWriteRefusal(method, h({ origin: 'http://patchbook.farm.example' }), own), method).toMatch(/Cross-site/);
		}
	});

	it('lets through reads, the own origin, and tools that send no browser headers', () => {
		for (const method of ['GET', 'HEAD', 'OPTIONS']) expect(crossSiteWriteRefusal(method, h({ origin: 'https://evil.example' }), own)).toBeNull();
		expect(crossSiteWriteRefusal('POST', h({ origin: own, 'sec-fetch-site': 'same-origin' }), own)).toBeNull();
		expect(crossSiteWriteRefusal('POST', h({ 'sec-fetch-site': 'none' }), own)).toBeNull(); // typed in the address bar
		expect(crossSiteWriteRefusal('POST', h({}), own)).toBeNull();
	});
});

describe('securityHeaders', () => {
	it('sends HSTS only over https, and the isolation and permission headers always', () => {
		expect(securityHeaders(true)['Strict-Transport-Security']).toBe('max-age=31536000; includeSubDomains');
		expect(securityHeaders(false)['Strict-Transport-Security']).toBeUndefined();
		for (const https of [true, false]) {
			const headers = securityHeaders(https);
			expect(headers['Cross-Origin-Opener-Policy']).toBe('same-origin');
			expect(headers['Permissions-Policy']).toMatch(/camera=\(\).*microphone=\(\).*geolocation=\(\)/);
			expect(headers['X-Frame-Options']).toBe('DENY');
			expect(headers['X-Content-Type-Options']).toBe('nosniff');
		}
	});
});

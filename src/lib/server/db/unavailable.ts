// When PostgreSQL cannot be reached (stopped, restarting, network gone) requests answer 503 with
// one plain sentence, JSON for APIs and the app's own data requests, instead of a 500 with an
// error id. The connection pool reconnects by itself once the server is back, so nothing here
// needs a restart. Used by src/hooks.server.ts.
import type { RequestEvent } from '@sveltejs/kit';

export const unavailableSentence = 'Patchbook cannot reach its database just now. Please try again in a minute.';

// Socket errors, postgres.js's own connection codes, and PostgreSQL's "server going away" SQLSTATEs
// (class 08 connection exception; 57P01-57P03 admin/crash shutdown, cannot connect now).
const codes = new Set([
	'ECONNREFUSED',
	'ECONNRESET',
	'ETIMEDOUT',
	'EPIPE',
	'EHOSTUNREACH',
	'ENETUNREACH',
	'CONNECTION_CLOSED',
	'CONNECTION_ENDED',
	'CONNECTION_DESTROYED',
	'CONNECT_TIMEOUT',
	'57P01',
	'57P02',
	'57P03'
]);

/** True when the error, or anything it wraps (drizzle's cause, AggregateError), is a lost database. */
export function isDatabaseUnavailable(error: unknown, depth = 0): boolean {
	if (!error || typeof error !== 'object' || depth > 5) return false;
	const e = error as { code?: unknown; cause?: unknown; errors?: unknown };
	if (typeof e.code === 'string' && (codes.has(e.code) || e.code.startsWith('08'))) return true;
	if (Array.isArray(e.errors) && e.errors.some((x) => isDatabaseUnavailable(x, depth + 1))) return true;
	return isDatabaseUnavailable(e.cause, depth + 1);
}

/** Requests that expect JSON back: APIs, client-side navigation data, enhanced form actions. */
function wantsJson(event: Pick<RequestEvent, 'url' | 'request'>): 'api' | 'action' | null {
	if (event.request.headers.get('x-sveltekit-action') === 'true') return 'action';
	const path = event.url.pathname;
	if (path.startsWith('/api/') || path.endsWith('/__data.json')) return 'api';
	if ((event.request.headers.get('accept') ?? '').startsWith('application/json')) return 'api';
	return null;
}

export function unavailableResponse(event: Pick<RequestEvent, 'url' | 'request'>): Response {
	const headers = { 'retry-after': '30', 'cache-control': 'no-store' };
	const kind = wantsJson(event);
	// An enhanced form reads an ActionResult; its error shows on the page like any other.
	if (kind === 'action') return Response.json({ type: 'error', status: 503, error: { message: unavailableSentence } }, { status: 503, headers });
	if (kind === 'api') return Response.json({ message: unavailableSentence, code: 'database-unavailable' }, { status: 503, headers });
	const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>Patchbook is unavailable</title></head><body style="font-family: system-ui, sans-serif; max-width: 36rem; margin: 4rem auto; padding: 0 1rem; line-height: 1.5"><h1 style="font-size: 1.25rem">Patchbook is unavailable</h1><p>${unavailableSentence}</p></body></html>`;
	return new Response(html, { status: 503, headers: { ...headers, 'content-type': 'text/html; charset=utf-8' } });
}

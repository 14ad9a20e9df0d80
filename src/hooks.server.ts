import type { Handle, HandleServerError, ServerInit } from '@sveltejs/kit';
import { building } from '$app/environment';
import { env } from '$env/dynamic/private';
import { startWorker, stopWorker } from '$lib/server/jobs/worker-process';
import { stopQueue } from '$lib/server/jobs/app-queue';
import { client } from '$lib/server/db';
import { isDatabaseUnavailable, unavailableResponse, unavailableSentence } from '$lib/server/db/unavailable';
import {
	clearSessionCookie,
	sessionCookieName,
	setSessionCookie,
	validateSession
} from '$lib/server/auth/session';
import { crossSiteWriteRefusal, securityHeaders } from '$lib/server/security/requests';

export const init: ServerInit = () => {
	if (building) return;
	startWorker({ DATABASE_URL: env.DATABASE_URL, PATCHBOOK_WORKER: env.PATCHBOOK_WORKER });
	// adapter-node's graceful shutdown: let the worker finish its job, then close the queue and
	// the database pool, whose open connections would otherwise keep the process alive.
	process.once('sveltekit:shutdown', async () => {
		stopWorker();
		await stopQueue();
		await client.end({ timeout: 5 });
	});
};

export const handle: Handle = async ({ event, resolve }) => {
	const refusal = crossSiteWriteRefusal(event.request.method, event.request.headers, event.url.origin);
	if (refusal) return withHeaders(new Response(refusal, { status: 403, headers: { 'content-type': 'text/plain' } }), event.url.protocol === 'https:');
	const token = event.cookies.get(sessionCookieName);
	event.locals.user = null;
	event.locals.session = null;
	if (token) {
		let validated: Awaited<ReturnType<typeof validateSession>>;
		try {
			validated = await validateSession(token);
		} catch (e) {
			if (!isDatabaseUnavailable(e)) throw e;
			console.error(`[db] unavailable: ${event.request.method} ${event.url.pathname} answered 503`);
			return withHeaders(unavailableResponse(event), event.url.protocol === 'https:');
		}
		const { session, user, renewed } = validated;
		if (session && user) {
			event.locals.user = user;
			event.locals.session = session;
			if (renewed) setSessionCookie(event.cookies, session, event.url.protocol === 'https:');
		} else {
			clearSessionCookie(event.cookies);
		}
	}
	let response = await resolve(event);
	// A load, action or endpoint lost the database (handleError noted it): 503, not 500.
	if (event.locals.databaseUnavailable) response = unavailableResponse(event);
	return withHeaders(response, event.url.protocol === 'https:');
};

function withHeaders(response: Response, https: boolean): Response {
	for (const [name, value] of Object.entries(securityHeaders(https))) response.headers.set(name, value);
	return response;
}

// Unexpected errors are logged with an id; people see the id, never the message, stack or SQL.
export const handleError: HandleServerError = ({ error, event, status, message }) => {
	if (status === 404) return { message };
	if (isDatabaseUnavailable(error)) {
		event.locals.databaseUnavailable = true;
		console.error(`[db] unavailable: ${event.request.method} ${event.url.pathname} answered 503`);
		return { message: unavailableSentence };
	}
	const id = crypto.randomUUID().slice(0, 8);
	console.error(`[error ${id}] ${event.request.method} ${event.url.pathname}`, error);
	return { message: 'Something went wrong on our side.', id };
};

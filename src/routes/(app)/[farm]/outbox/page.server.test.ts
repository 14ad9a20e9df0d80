// The development outbox page: a farm's managers read the farm's mail and nothing else.
import { describe, expect, it } from 'vitest';
import { composeMail } from '$lib/mail/compose';
import { sendMail } from '$lib/server/mail/mailer';
import { eventFor, join, makeFarm, makeUser, statusOf } from '$lib/server/testing/fixtures';
import { waitForMail } from '$lib/server/testing/outbox';
import { load as layoutLoad } from '../+layout.server';
import { load as detailLoad } from './[id=uuid]/+page.server';
import { load as listLoad } from './+page.server';

type AnyLoad = (e: unknown) => Promise<unknown>;
const list = (e: unknown) => (listLoad as unknown as AnyLoad)(e) as Promise<{ mails: { id: string; subject: string; kind: string | null }[] }>;
const detail = (e: unknown) => (detailLoad as unknown as AnyLoad)(e) as Promise<{ mail: { subject: string; textBody: string; htmlBody: string } }>;
const layout = (e: unknown) => (layoutLoad as unknown as AnyLoad)(e) as Promise<{ nav: string[] }>;

async function send(to: string, subject: string, farmId: string | null) {
	const since = new Date(Date.now() - 1000);
	const parts = composeMail({ paragraphs: [`About ${subject}.`, '<script>alert(1)</script>'] });
	expect((await sendMail({ to, subject, kind: 'test', farmId, ...parts })).ok).toBe(true);
	return waitForMail(to, { since });
}

describe('development outbox page', () => {
	it('lists only this farm\'s mail, newest first, and opens one with both parts; another farm\'s is not found', async () => {
		const [farm, other] = [await makeFarm(), await makeFarm()];
		const [manager, agronomist] = [await makeUser(), await makeUser()];
		await join(farm.id, manager.id, 'manager');
		await join(farm.id, agronomist.id, 'agronomist');
		const first = await send(agronomist.email, 'First for this farm', farm.id);
		const second = await send(manager.email, 'Second for this farm', farm.id);
		const elsewhere = await send(manager.email, 'For the other farm', other.id);
		await send(manager.email, 'About no farm', null);

		const page = await list(eventFor(manager, { farm: farm.slug }));
		expect(page.mails.map((m) => m.subject)).toEqual(['Second for this farm', 'First for this farm']);
		expect(page.mails.map((m) => m.id)).toEqual([second.id, first.id]);

		const opened = await detail(eventFor(manager, { farm: farm.slug, id: first.id }));
		expect(opened.mail.subject).toBe('First for this farm');
		expect(opened.mail.textBody).toContain('About First for this farm.');
		expect(opened.mail.htmlBody).toContain('&lt;script&gt;');
		expect(await statusOf(detail(eventFor(manager, { farm: farm.slug, id: elsewhere.id })))).toBe(404);
	});

	it('agronomists get 403; with the outbox off everyone gets 404 and no link', async () => {
		const farm = await makeFarm();
		const [manager, agronomist, outsider] = [await makeUser(), await makeUser(), await makeUser()];
		await join(farm.id, manager.id, 'manager');
		await join(farm.id, agronomist.id, 'agronomist');
		expect(await statusOf(list(eventFor(agronomist, { farm: farm.slug })))).toBe(403);
		expect(await statusOf(list(eventFor(outsider, { farm: farm.slug })))).toBe(404);
		expect((await layout(eventFor(manager, { farm: farm.slug }))).nav).toContain('outbox');
		expect((await layout(eventFor(agronomist, { farm: farm.slug }))).nav).not.toContain('outbox');

		const saved = process.env.PATCHBOOK_DEV_OUTBOX;
		process.env.PATCHBOOK_DEV_OUTBOX = 'off';
		try {
			expect(await statusOf(list(eventFor(manager, { farm: farm.slug })))).toBe(404);
			expect(await statusOf(detail(eventFor(manager, { farm: farm.slug, id: crypto.randomUUID() })))).toBe(404);
			expect((await layout(eventFor(manager, { farm: farm.slug }))).nav).not.toContain('outbox');
		} finally {
			process.env.PATCHBOOK_DEV_OUTBOX = saved;
		}
	});
});

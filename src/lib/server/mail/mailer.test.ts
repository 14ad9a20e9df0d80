// Through the real nodemailer and the fake SMTP server (started by tests/global-setup.ts) into
// the development outbox; the parts are read back by mailparser on the server side.
import { describe, expect, it } from 'vitest';
import { composeMail } from '$lib/mail/compose';
import { waitForMail } from '$lib/server/testing/outbox';
import { sendMail } from './mailer';

describe('sendMail', () => {
	it('delivers a message with a text and an HTML part, tagged with its kind and farm', async () => {
		const since = new Date(Date.now() - 1000);
		const farmId = crypto.randomUUID();
		const to = `Someone.${Date.now()}@Example.org`;
		const parts = composeMail({ greeting: 'Hello,', paragraphs: ['A test message.'], action: { label: 'Open', url: 'http://127.0.0.1:4173/x' } });
		const sent = await sendMail({ to, subject: 'Testing the outbox', kind: 'test', farmId, ...parts });
		expect(sent.ok).toBe(true);
		const mail = await waitForMail(to, { since });
		expect(mail).toMatchObject({ subject: 'Testing the outbox', kind: 'test', farmId, envelopeTo: [to.toLowerCase()] });
		expect(mail.textBody).toContain('Open: http://127.0.0.1:4173/x');
		expect(mail.htmlBody).toContain('href="http://127.0.0.1:4173/x"');
		expect(mail.raw).toMatch(/Content-Type: multipart\/alternative/i);
	});

	it('a mail server that is not there gives a sentence, not an exception', async () => {
		const saved = process.env.SMTP_URL;
		process.env.SMTP_URL = 'smtp://127.0.0.1:9'; // discard port: nothing listens
		try {
			const sent = await sendMail({ to: 'x@example.org', subject: 's', text: 't', html: '<p>t</p>', kind: 'test' });
			expect(sent).toEqual({ ok: false, reason: 'The mail server did not take the message.' });
		} finally {
			process.env.SMTP_URL = saved;
		}
		process.env.SMTP_URL = '';
		try {
			expect(await sendMail({ to: 'x@example.org', subject: 's', text: 't', html: '<p>t</p>', kind: 'test' })).toEqual({ ok: false, reason: 'No mail server is set up (SMTP_URL is empty).' });
		} finally {
			process.env.SMTP_URL = saved;
		}
	});
});

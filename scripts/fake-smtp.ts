// A local stand-in for a mail server: takes SMTP on loopback and keeps every message in the
// dev_outbox table of the database it is given, where the app's development outbox and the tests
// read them. Nothing is relayed anywhere. Started by npm start, the e2e server and vitest's
// global set-up; production sets SMTP_URL to a real server instead.
//   npx tsx scripts/fake-smtp.ts        (DATABASE_URL, PATCHBOOK_SMTP_PORT, default 2525)
import { simpleParser } from 'mailparser';
import postgres from 'postgres';
import { SMTPServer } from 'smtp-server';

const MAX_BYTES = 25 * 1024 * 1024;
const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export type FakeSmtp = { port: number; close: () => Promise<void> };

export async function startFakeSmtp(options: { databaseUrl: string; port: number; host?: string }): Promise<FakeSmtp> {
	const sql = postgres(options.databaseUrl, { max: 2, onnotice: () => {} });
	const server = new SMTPServer({
		authOptional: true,
		// Loopback only, so no TLS; accept any login a client insists on.
		disabledCommands: ['STARTTLS'],
		onAuth: (_auth, _session, callback) => callback(null, { user: 'fake' }),
		size: MAX_BYTES,
		banner: 'Patchbook fake SMTP (development outbox, relays nothing)',
		logger: false,
		onData(stream, session, callback) {
			const chunks: Buffer[] = [];
			stream.on('data', (c: Buffer) => chunks.push(c));
			stream.on('end', async () => {
				try {
					const raw = Buffer.concat(chunks);
					const mail = await simpleParser(raw);
					const header = (name: string) => {
						const v = mail.headers.get(name);
						return typeof v === 'string' ? v.trim() : null;
					};
					const farm = header('x-patchbook-farm');
					await sql`insert into dev_outbox (envelope_from, envelope_to, message_id, subject, farm_id, kind, text_body, html_body, raw) values (
						${session.envelope.mailFrom ? session.envelope.mailFrom.address.toLowerCase() : ''},
						${session.envelope.rcptTo.map((r) => r.address.toLowerCase())},
						${mail.messageId ?? null}, ${mail.subject ?? ''}, ${farm && uuidPattern.test(farm) ? farm : null},
						${header('x-patchbook-kind')}, ${mail.text ?? null}, ${typeof mail.html === 'string' ? mail.html : null}, ${raw.toString('utf8')})`;
					callback();
				} catch (e) {
					console.error('[fake-smtp] could not keep a message:', e);
					callback(new Error('The fake mail server could not store the message.'));
				}
			});
		}
	});
	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(options.port, options.host ?? '127.0.0.1', () => resolve());
	});
	const address = server.server.address();
	return {
		port: typeof address === 'object' && address ? address.port : options.port,
		close: async () => {
			await new Promise<void>((resolve) => server.close(() => resolve()));
			await sql.end({ timeout: 5 });
		}
	};
}

// Run as a script: listen until the parent (npm start's shell or the e2e server) is gone.
if (import.meta.url === `file://${process.argv[1]}`) {
	const databaseUrl = process.env.DATABASE_URL;
	const port = Number(process.env.PATCHBOOK_SMTP_PORT ?? 2525);
	if (!databaseUrl) {
		console.error('fake-smtp: set DATABASE_URL');
		process.exit(2);
	}
	try {
		const fake = await startFakeSmtp({ databaseUrl, port });
		console.log(`fake-smtp: development outbox on smtp://127.0.0.1:${fake.port} (relays nothing)`);
		const parent = process.ppid;
		const stop = async () => {
			await fake.close();
			process.exit(0);
		};
		process.on('SIGTERM', stop);
		process.on('SIGINT', stop);
		// Re-parented: whoever started us has gone, so stop too instead of lingering on the port.
		setInterval(() => {
			if (process.ppid !== parent) void stop();
		}, 2000).unref();
		setInterval(() => {}, 1 << 30);
	} catch (e) {
		if ((e as NodeJS.ErrnoException).code === 'EADDRINUSE') {
			console.error(`fake-smtp: port ${port} is taken (another fake SMTP running?); set PATCHBOOK_SMTP_PORT to another port.`);
			process.exit(1);
		}
		throw e;
	}
}

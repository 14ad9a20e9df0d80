// A manager e-mails a landlord the link to their season summary: names and a link, never figures
// (see $lib/mail/landlord-summary). Audited as summary.emailed, whether or not the mail server took it.
import { error } from '@sveltejs/kit';
import { may, type Actor } from '$lib/server/auth/guard';
import { record } from '$lib/server/audit';
import { publicOrigin, sendMail, type Sent } from '$lib/server/mail/mailer';
import { landlordSummaryMail } from '$lib/mail/landlord-summary';
import { getLandlord } from './grants';

/** Sends the mail; null when `userId` is not a landlord member of this farm. */
export async function emailSummary(actor: Actor, userId: string, season: number): Promise<(Sent & { to: string; name: string }) | null> {
	if (!may(actor.role, 'grants.manage')) error(403, 'Only the farm’s managers may send season summaries.');
	const landlord = await getLandlord(actor, userId);
	if (!landlord) return null;
	const url = `${publicOrigin()}/${actor.farm.slug}/summaries?season=${season}`;
	const mail = landlordSummaryMail({
		landlordName: landlord.name,
		farmName: actor.farm.name,
		managerName: actor.user.name,
		season,
		fieldNames: landlord.grants.map((g) => g.fieldName),
		url
	});
	const sent = await sendMail({ to: landlord.email, subject: mail.subject, text: mail.text, html: mail.html, kind: 'landlord-summary', farmId: actor.farm.id });
	await record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'summary.emailed',
		targetType: 'user',
		targetId: userId,
		detail: { landlord: landlord.name, to: landlord.email, season, fields: landlord.grants.map((g) => g.fieldName), sent: sent.ok, ...(sent.ok ? {} : { reason: sent.reason }) }
	});
	return { ...sent, to: landlord.email, name: landlord.name };
}

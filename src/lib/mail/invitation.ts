// The words of an invitation: which farm, which role, who invited, until when the link works.
// Pure: the caller gives names, dates and the link; composeMail makes the text and HTML parts.
import type { Role } from '$lib/server/db/schema/farms';
import { composeMail, type MailParts } from './compose';
import { roleDescriptions, withArticle } from '$lib/team/roles';

export type InvitationWords = {
	farmName: string;
	role: Role;
	inviterName: string;
	expiresAt: Date;
	/** IANA zone the expiry is written in (the farm's). */
	timeZone: string;
	url: string;
};

/** "Wednesday 9 December 2026, 04:40 (Europe/Dublin)": the farm's clock, its zone named. */
export function expiryWords(at: Date, timeZone: string): string {
	// Built from parts: the joining words and commas of toLocaleString differ between ICU versions.
	const parts = new Intl.DateTimeFormat('en-GB', {
		timeZone,
		weekday: 'long',
		day: 'numeric',
		month: 'long',
		year: 'numeric',
		hour: '2-digit',
		minute: '2-digit',
		hourCycle: 'h23'
	}).formatToParts(at);
	const get = (type: Intl.DateTimeFormatPartTypes) => parts.find((p) => p.type === type)?.value ?? '';
	return `${get('weekday')} ${get('day')} ${get('month')} ${get('year')}, ${get('hour')}:${get('minute')} (${timeZone})`;
}

export function invitationMail(w: InvitationWords): MailParts & { subject: string } {
	const subject = `${w.inviterName} invited you to ${w.farmName} on Patchbook`;
	return {
		subject,
		...composeMail({
			greeting: 'Hello,',
			paragraphs: [
				`${w.inviterName} invited you to join ${w.farmName} on Patchbook as ${withArticle(w.role)}: a ${w.role} ${roleDescriptions[w.role]}.`,
				`The link below works once and until ${expiryWords(w.expiresAt, w.timeZone)}. If you already have a Patchbook account with this e-mail address, you join with your password; otherwise you choose a name and a password.`
			],
			action: { label: 'Accept the invitation', url: w.url },
			footnote: [
				`You got this because ${w.inviterName} entered your e-mail address. If you do not expect it, ignore this message: nothing happens unless the link is opened.`
			]
		})
	};
}

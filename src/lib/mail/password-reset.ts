// The words of the password reset message. Pure: the caller gives the link and the expiry.
import { composeMail, type MailParts } from './compose';

export type PasswordResetWords = {
	name: string;
	/** `${publicOrigin()}/reset-password/<token>` */
	url: string;
	expiresInMinutes: number;
};

export function passwordResetMail(w: PasswordResetWords): MailParts & { subject: string } {
	const expiry = w.expiresInMinutes % 60 === 0 ? `${w.expiresInMinutes / 60} hour${w.expiresInMinutes === 60 ? '' : 's'}` : `${w.expiresInMinutes} minutes`;
	return {
		subject: 'Reset your Patchbook password',
		...composeMail({
			greeting: `Hello ${w.name},`,
			paragraphs: [
				'Someone, hopefully you, asked to reset the password of your Patchbook account.',
				`Choose a new password with the link below. It works once and expires in ${expiry}. Setting a new password signs you out on every other device.`
			],
			action: { label: 'Choose a new password', url: w.url },
			footnote: ['If you did not ask for this, ignore this message: your password stays as it is.']
		})
	};
}

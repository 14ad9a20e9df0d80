import { eq } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { users } from '$lib/server/db/schema';
import { hashPassword, verifyPassword } from '$lib/server/auth/password';

// Verifying against a real hash when the e-mail is unknown keeps the answer time the same,
// so timing does not tell whether an account exists.
let decoyHash: Promise<string> | null = null;

/** The user id when e-mail and password match, else null. */
export async function checkCredentials(email: string, password: string): Promise<string | null> {
	const [user] = await db
		.select({ id: users.id, passwordHash: users.passwordHash })
		.from(users)
		.where(eq(users.email, email.trim().toLowerCase()));
	if (!user) {
		await verifyPassword(await (decoyHash ??= hashPassword('decoy-password-never-used')), password);
		return null;
	}
	return (await verifyPassword(user.passwordHash, password)) ? user.id : null;
}

export async function passwordMatches(userId: string, password: string): Promise<boolean> {
	const [user] = await db.select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, userId));
	return !!user && (await verifyPassword(user.passwordHash, password));
}

export async function setPassword(userId: string, password: string): Promise<void> {
	await db.update(users).set({ passwordHash: await hashPassword(password) }).where(eq(users.id, userId));
}

export async function setUnits(userId: string, units: 'metric' | 'us'): Promise<void> {
	await db.update(users).set({ units }).where(eq(users.id, userId));
}

/** Whether the person gets mail about processed and failed uploads. */
export async function notifyUploads(userId: string): Promise<boolean> {
	const [user] = await db.select({ notifyUploads: users.notifyUploads }).from(users).where(eq(users.id, userId));
	return user?.notifyUploads ?? false;
}

export async function setNotifyUploads(userId: string, on: boolean): Promise<void> {
	await db.update(users).set({ notifyUploads: on }).where(eq(users.id, userId));
}

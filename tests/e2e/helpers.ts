import { expect, type Page } from '@playwright/test';

export const password = 'patchbook-demo';

export const people = {
	manager: 'mara@tallowgrass.example',
	agronomist: 'dev@fieldwise-agronomy.example',
	operator: 'sam@tallowgrass.example',
	landlord: 'helen.marsh@landowner.example',
	otherFarmManager: 'tom@brennancreek.example'
} as const;

export async function signIn(page: Page, email: string, pass = password) {
	await page.goto('/login');
	await page.locator('html[data-hydrated="true"]').waitFor();
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Password').fill(pass);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).not.toHaveURL(/\/login/);
}

import { expect, type Page } from '@playwright/test';
import fs from 'node:fs';
import path from 'node:path';

export const DEMO_PASSWORD = 'pin-the-defects';
export const SHOTS = path.resolve(import.meta.dirname, 'screenshots');

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD) {
	await page.goto('/sign-in');
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).not.toHaveURL(/\/sign-in/);
}

export async function shoot(page: Page, name: string) {
	fs.mkdirSync(SHOTS, { recursive: true });
	await page.screenshot({ path: path.join(SHOTS, `${name}.png`), fullPage: true });
}

export function unique(label: string) {
	return `${label}-${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}@example.com`;
}

/** Creates an account through the sign-up page; ends on the page sign-up leads to. */
export async function signUp(page: Page, name: string, email: string, password = 'a long enough password') {
	await page.goto('/sign-up');
	await page.getByLabel('Your name').fill(name);
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Create account' }).click();
	await expect(page).toHaveURL(/\/welcome$/);
}

/** Sets up a new organisation from the welcome page; its creator lands on Team as its admin. */
export async function setUpOrganisation(page: Page, name: string) {
	await page.getByLabel('Plant or company name').fill(name);
	await page.getByRole('button', { name: 'Set up the organisation' }).click();
	await expect(page.getByRole('heading', { name: `Members of ${name}` })).toBeVisible();
}

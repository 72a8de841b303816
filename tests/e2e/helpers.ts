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

import { expect, test } from '@playwright/test';
import { setUpOrganisation, shoot, signUp, unique } from './helpers';

test('a new user sets up a plant, invites an inspector, who joins from the e-mail and sees only inspector screens', async ({
	browser,
	page
}) => {
	const founder = unique('founder');
	const inspector = unique('inspector');

	// Sign up and create the organisation.
	await signUp(page, 'Petra Lund', founder);
	await setUpOrganisation(page, 'Lund Pressings');
	await expect(page).toHaveURL(/\/team$/);

	// Invite an inspector.
	await page.getByLabel('E-mail').fill(inspector);
	await page.getByRole('radio', { name: /Inspector/ }).check();
	await page.getByRole('button', { name: 'Send the invitation' }).click();
	await expect(page.getByText(`Invitation sent to ${inspector}.`)).toBeVisible();
	await expect(page.getByText(inspector).last()).toBeVisible();

	// Read the invitation in the mailbox, as the admin.
	await page.getByRole('link', { name: 'Mailbox' }).click();
	const mail = page.getByTestId('caught-mail').filter({ hasText: inspector }).first();
	await expect(mail).toContainText('Join Lund Pressings on Stipple');
	const link = await mail.getByRole('link').first().getAttribute('href');
	expect(link).toMatch(/\/invite\/[A-Za-z0-9_-]+$/);

	// The inspector, in a browser of their own, follows the link and creates an account.
	const other = await browser.newContext();
	const tab = await other.newPage();
	await tab.goto(link!);
	await expect(tab.getByRole('heading', { name: 'Join Lund Pressings' })).toBeVisible();
	await tab.getByRole('link', { name: 'Create an account' }).click();
	await tab.getByLabel('Your name').fill('Ivo Sand');
	await expect(tab.getByLabel('E-mail')).toHaveValue(inspector);
	await tab.getByLabel('Password').fill('another long password');
	await tab.getByRole('button', { name: 'Create account' }).click();
	await expect(tab).toHaveURL(/\/invite\//);
	await tab.getByRole('button', { name: 'Accept and join' }).click();
	await expect(tab.getByText('Lund Pressings · Inspector')).toBeVisible();

	// Only what an inspector may.
	const nav = tab.getByRole('navigation', { name: 'Screens' });
	await expect(nav.getByRole('link', { name: 'Bench' })).toBeVisible();
	await expect(nav.getByRole('link', { name: 'Setup' })).toBeVisible();
	for (const hidden of ['Team', 'Signals', 'Trends', 'Mailbox']) {
		await expect(nav.getByRole('link', { name: hidden })).toHaveCount(0);
	}
	const team = await tab.goto('/team');
	expect(team?.status()).toBe(403);
	const members = await tab.request.get('/api/v1/members');
	expect(members.status()).toBe(403);
	expect((await members.json()).error.code).toBe('forbidden');
	await shoot(tab, 'inspector-home');

	// The admin sees the new member with the inspector role.
	await page.goto('/team');
	const row = page.getByRole('row', { name: /Ivo Sand/ });
	await expect(row.getByRole('combobox')).toHaveValue('inspector');
	await other.close();
});

test('a forgotten password is reset from the e-mailed link', async ({ browser, page }) => {
	const email = unique('forgetful');
	await signUp(page, 'Nell Hart', email, 'the first password');
	await setUpOrganisation(page, 'Hart Castings');

	const anon = await browser.newContext();
	const tab = await anon.newPage();
	await tab.goto('/forgot');
	await tab.getByLabel('E-mail').fill(email);
	await tab.getByRole('button', { name: 'Send the link' }).click();
	await expect(tab.getByText('Check the inbox of')).toBeVisible();

	// Nell is the admin of her own plant, so she reads her own caught mail.
	await page.goto('/mailbox');
	const mail = page.getByTestId('caught-mail').filter({ hasText: 'Reset your Stipple password' }).first();
	const link = await mail.getByRole('link').first().getAttribute('href');
	expect(link).toContain('/reset?token=');

	await tab.goto(link!);
	await tab.getByLabel('New password').fill('the second password');
	await tab.getByLabel('The same again').fill('the second password');
	await tab.getByRole('button', { name: 'Save the new password' }).click();
	await expect(tab.getByText('Your password is changed.')).toBeVisible();
	await tab.getByLabel('E-mail').fill(email);
	await tab.getByLabel('Password').fill('the second password');
	await tab.getByRole('button', { name: 'Sign in' }).click();
	await expect(tab.getByRole('heading', { name: /Good to see you, Nell/ })).toBeVisible();
	await anon.close();
});

test('a wrong password is refused with a clear message', async ({ page }) => {
	await page.goto('/sign-in');
	await page.getByLabel('E-mail').fill('engineer@example.com');
	await page.getByLabel('Password').fill('not the password');
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page.getByRole('alert')).toContainText('do not match an account');
	await expect(page.getByLabel('E-mail')).toHaveValue('engineer@example.com');
});

test('someone in two organisations switches between them', async ({ page }) => {
	const email = unique('twoplants');
	await signUp(page, 'Tove Ek', email);
	await setUpOrganisation(page, 'Ek Plant North');

	await page.getByRole('button', { name: /Tove Ek/ }).click();
	await page.getByRole('link', { name: 'Add an organisation' }).click();
	await setUpOrganisation(page, 'Ek Plant South');

	const switcher = page.getByLabel('Organisation', { exact: true });
	await switcher.selectOption({ label: 'Ek Plant North' });
	await expect(page.getByText('Ek Plant North · Admin')).toBeVisible();
	await page.goto('/team');
	await expect(page.getByRole('heading', { name: 'Members of Ek Plant North' })).toBeVisible();
});

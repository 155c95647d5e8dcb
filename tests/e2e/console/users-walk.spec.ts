// The administrator's Users page at 1440×900: invite someone, read the invitation in the development
// mailbox, resend it (the new link works, the old one is refused, as the server does), change a role,
// deactivate (signed out at once, sign-in refused). Screenshots: test-results/screenshots/users-*.png.
import { expect, test, type Page } from '@playwright/test';
import { demo, signIn } from '../support/session';
import { smallTargets } from '../support/touchTargets';
import { apiGet, apiSignIn, bearer } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test.use({ viewport: { width: 1440, height: 900 } });

const shot = async (page: Page, name: string) => {
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/screenshots/users-${name}.png` });
};

/** The set-password links of the mails to `to` in the development mailbox page, newest first. */
async function mailboxLinks(page: Page, to: string): Promise<string[]> {
  const mails = page.locator('[data-test^="mail-"]').filter({ hasText: `to ${to}` });
  await expect(mails.first()).toBeVisible();
  const links: string[] = [];
  for (const mail of await mails.all()) {
    if (!(await mail.getByTestId('mail-link').isVisible())) await mail.locator('.q-item').first().click();
    const href = await mail.getByTestId('mail-link').first().getAttribute('href');
    const url = new URL(href!);
    links.push(url.pathname + url.search);
  }
  return links;
}

async function setPassword(page: Page, link: string, password: string): Promise<void> {
  await page.goto(link);
  await page.getByTestId('new-password').fill(password);
  await page.getByTestId('new-password-again').fill(password);
  await page.getByTestId('set-password').click();
}

test('an administrator invites, resends, changes a role and deactivates', async ({ page, browser }) => {
  test.setTimeout(150_000);
  const email = `avery.fresh.${Date.now()}@demo.corewright.test`;
  const row = page.getByTestId(`user-row-${email}`);
  await signIn(page, demo.admin);
  await page.goto('/users');
  await expect(page.getByTestId('users-table')).toContainText(demo.supervisor);
  // Roles by name, never the stored value.
  await expect(page.getByTestId('user-menu')).toContainText('Administrator');
  await expect(page.getByTestId(`user-row-${demo.admin}`)).toContainText('Administrator');
  expect(await smallTargets(page, 48)).toEqual([]);
  await shot(page, 'list');

  // Invite a technician.
  await page.getByTestId('invite-name').fill('Avery Fresh (demo)');
  await page.getByTestId('invite-email').fill(email);
  await page.getByTestId('invite-send').click();
  await expect(row).toContainText('Invited');
  await expect(row).toContainText('Technician');
  await shot(page, 'invited');

  // The invitation in the development mailbox, reached from the Users page.
  await page.getByTestId('open-mailbox').click();
  await expect(page.getByTestId('mailbox')).toContainText('Your Corewright account');
  const [first] = await mailboxLinks(page, email);
  expect(first).toMatch(/^\/set-password\?token=/);
  await shot(page, 'mailbox');
  await page.getByTestId('mailbox-back').click();
  await expect(page).toHaveURL(/\/users$/);

  // Resend: a new link; the first one is dead.
  await page.getByTestId(`user-resend-${email}`).click();
  await expect(page.locator('.q-notification').filter({ hasText: 'A new invitation' })).toContainText(`A new invitation went to ${email}; the earlier link no longer works.`);
  await shot(page, 'resent');
  await page.getByTestId('open-mailbox').click();
  await expect.poll(async () => (await mailboxLinks(page, email)).length).toBe(2);
  const [second] = await mailboxLinks(page, email);
  expect(second).not.toBe(first);

  const invitee = await browser.newContext({ viewport: { width: 1440, height: 900 } });
  const other = await invitee.newPage();
  const password = 'four tall wafers of brass';
  await setPassword(other, first!, password);
  await expect(other.getByTestId('error-banner')).toContainText('expired or was used already');
  await shot(other, 'old-link-refused');
  await setPassword(other, second!, password);
  await expect(other).toHaveURL(/\/sign-in/);

  // Back on the Users page: the account is active; make it a supervisor.
  await page.goto('/users');
  await expect(row).toContainText('Active');
  await expect(page.getByTestId(`user-resend-${email}`)).toHaveCount(0);
  await page.getByTestId(`user-role-${email}`).click();
  await page.getByRole('option', { name: 'Supervisor' }).click();
  await expect(page.locator('.q-notification').last()).toContainText('Avery Fresh (demo): now supervisor.');
  await expect(row).toContainText('Supervisor');
  const admin = await apiSignIn(page.request, demo.admin);
  const { users } = await apiGet<{ users: { email: string; role: string; active: boolean }[] }>(page.request, admin, '/api/users');
  expect(users.find((u) => u.email === email)).toMatchObject({ role: 'supervisor', active: true });
  await shot(page, 'role-changed');

  // Deactivate: asked first, then signed out everywhere at once.
  const own = await apiSignIn(page.request, email, password);
  expect((await page.request.get('/api/auth/me', { headers: bearer(own) })).status()).toBe(200);
  await page.getByTestId(`user-active-${email}`).click();
  await expect(page.locator('.q-dialog')).toContainText('Deactivate Avery Fresh (demo)?');
  await shot(page, 'deactivate-asked');
  await page.locator('.q-dialog').getByRole('button', { name: 'Deactivate' }).click();
  await expect(row).toContainText('Deactivated');
  await expect(page.getByTestId(`user-active-${email}`)).toContainText('Reactivate');
  await shot(page, 'deactivated');
  // Their session ends at once, and the password no longer signs in.
  expect((await page.request.get('/api/auth/me', { headers: bearer(own) })).status()).toBe(401);
  await other.goto('/sign-in');
  await other.getByTestId('email').fill(email);
  await other.getByTestId('password').fill(password);
  await other.getByTestId('sign-in').click();
  await expect(other.getByTestId('sign-in-error')).toContainText('do not match an active account');
  await shot(other, 'deactivated-sign-in');
  await invitee.close();
});

// An invited user opens the link from the captured e-mail, chooses a password, and signs in.
import { expect, test } from '@playwright/test';
import { demo, signIn } from '../support/session';
import { waitForMail } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

test('an invited user sets a password from the e-mail link and signs in', async ({ page }) => {
  const email = `new.bench.${Date.now()}@demo.corewright.test`;
  await signIn(page, demo.admin);
  await page.goto('/users');
  await page.getByTestId('invite-name').fill('Casey New (demo)');
  await page.getByTestId('invite-email').fill(email);
  // A supervisor, so the sign-in lands in the console (a technician's first stop is the Bench's unlock step).
  await page.getByTestId('invite-role').click();
  await page.getByRole('option', { name: 'Supervisor' }).click();
  await page.getByTestId('invite-send').click();
  await expect(page.getByTestId(`user-row-${email}`)).toContainText('Invited');

  const mail = await waitForMail(page.request, email, /Your Corewright account/);
  const link = mail.text.match(/https?:\/\/\S+\/set-password\?token=\S+/)?.[0];
  expect(link).toBeTruthy();

  await page.evaluate(() => localStorage.removeItem('cw.session'));
  await page.goto(new URL(link!).pathname + new URL(link!).search);
  await page.getByTestId('new-password').fill('short');
  await page.getByTestId('new-password-again').fill('short');
  await expect(page.getByTestId('set-password')).toBeDisabled();
  const password = 'three brass wafers at dawn';
  await page.getByTestId('new-password').fill(password);
  await page.getByTestId('new-password-again').fill(password);
  await page.getByTestId('set-password').click();
  await expect(page).toHaveURL(/\/sign-in/);

  await signIn(page, email, password);
  await expect(page).toHaveURL(/\/overview/);
  await expect(page.getByTestId('user-name')).toContainText('Casey New');

  // The link works once.
  await page.evaluate(() => localStorage.removeItem('cw.session'));
  await page.goto(new URL(link!).pathname + new URL(link!).search);
  await page.getByTestId('new-password').fill(password);
  await page.getByTestId('new-password-again').fill(password);
  await page.getByTestId('set-password').click();
  await expect(page.getByTestId('error-banner')).toContainText('expired or was used already');
});

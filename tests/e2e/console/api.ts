/** API helpers for the console specs: sign in without the browser, read the dev mailbox, call routes with a token. */
import { randomUUID } from 'node:crypto';
import { expect, type APIRequestContext, type Page } from '@playwright/test';
import { DEMO_PASSWORD } from '../support/session';

export interface ApiSession {
  token: string;
  deviceId: string;
  userId: string;
}

export async function apiSignIn(request: APIRequestContext, email: string, password = DEMO_PASSWORD): Promise<ApiSession> {
  const deviceId = randomUUID();
  const res = await request.post('/api/auth/sign-in', { data: { email, password, deviceId } });
  expect(res.status(), await res.text()).toBe(200);
  const body = (await res.json()) as { accessToken: string; user: { id: string } };
  return { token: body.accessToken, deviceId, userId: body.user.id };
}

export const bearer = (s: ApiSession) => ({ Authorization: `Bearer ${s.token}` });

export async function apiGet<T>(request: APIRequestContext, s: ApiSession, path: string): Promise<T> {
  const res = await request.get(path, { headers: bearer(s) });
  expect(res.status(), `${path}: ${await res.text()}`).toBe(200);
  return (await res.json()) as T;
}

/** POSTs as the session's user and expects `status` (201 unless told). */
export async function apiPost<T>(request: APIRequestContext, s: ApiSession, path: string, data: unknown, status = 201): Promise<T> {
  const res = await request.post(path, { headers: bearer(s), data });
  expect(res.status(), `${path}: ${await res.text()}`).toBe(status);
  return (await res.json()) as T;
}

export interface Mail {
  id: number;
  to: string[];
  subject: string;
  text: string;
}

/**
 * Waits until a captured mail to `to` matches (at least `count` of them); mail is sent after the request answers, so
 * poll. The newest match (the mailbox lists newest first).
 */
export async function waitForMail(request: APIRequestContext, to: string, subject: RegExp, count = 1): Promise<Mail> {
  let found: Mail[] = [];
  await expect
    .poll(
      async () => {
        const res = await request.get(`/api/dev/mailbox?to=${encodeURIComponent(to)}`);
        const { messages } = (await res.json()) as { messages: Mail[] };
        found = messages.filter((m) => subject.test(m.subject));
        return found.length >= count;
      },
      { timeout: 10_000, message: `${count === 1 ? 'a mail' : `${count} mails`} to ${to} with subject ${subject}` },
    )
    .toBe(true);
  return found[0]!;
}

export const csv = (name: string, lines: string[]) => ({ name, mimeType: 'text/csv', buffer: Buffer.from(`${lines.join('\n')}\n`, 'utf8') });

/**
 * Signs in through the page and waits only for it to leave the sign-in screen: a technician
 * lands on the Bench's unlock step, which has no user menu to wait for.
 */
export async function signInAnywhere(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto('/sign-in');
  await page.getByTestId('email').fill(email);
  await page.getByTestId('password').fill(password);
  await page.getByTestId('sign-in').click();
  await expect(page).not.toHaveURL(/\/sign-in/);
}

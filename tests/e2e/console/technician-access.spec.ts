// The console is for supervisors and admins: a technician is sent back to the Bench, and the API refuses.
import { expect, test } from '@playwright/test';
import type { WorkOrder } from '../../../shared/schemas/records';
import { demo } from '../support/session';
import { apiGet, apiSignIn, bearer, signInAnywhere } from './api';
import { freshDemo } from '../support/freshDemo';

test.beforeAll(freshDemo);

const pages = ['/overview', '/work-orders', '/work-orders/new', '/completions?result=failed', '/key-systems', '/profiles', '/doors', '/users', '/audit-trail'];
// Key control: holders' data and the cut list are the office's alone.
const keyControlPages = ['/key-holders', '/key-requests', '/key-requests/new', '/key-issues', '/key-issues?tab=chase', '/key-issues/new'];

test('a technician cannot open any console page and the API answers 403', async ({ page }) => {
  const tech = await apiSignIn(page.request, demo.technician);
  const { workOrders } = await apiGet<{ workOrders: WorkOrder[] }>(page.request, tech, '/api/work-orders');
  const own = workOrders[0]!;

  await signInAnywhere(page, demo.technician);
  for (const path of [...pages, ...keyControlPages, `/work-orders/${own.id}`, `/work-orders/${own.id}/print`, `/work-orders/${own.id}/tags`]) {
    await page.goto(path);
    // Sent to the Bench (its unlock step first when the tablet store is locked), never the console page.
    await expect(page, path).toHaveURL(/\/(bench|unlock)(\?next=%2Fbench)?$/);
    await expect(page.getByTestId('wo-save').or(page.getByTestId('completion-table')).or(page.getByTestId('users-table')).or(page.getByTestId('holders-table')).or(page.getByTestId('issues-table'))).toHaveCount(0);
  }

  const refused = [
    '/api/completions',
    '/api/completions.csv',
    '/api/doors',
    '/api/key-systems',
    '/api/profiles',
    '/api/technicians',
    '/api/users',
    '/api/devices',
    '/api/audit-events',
    `/api/work-orders/${own.id}/charts`,
    '/api/holders',
    '/api/departments',
    '/api/key-issues',
    '/api/key-issues/outstanding',
    '/api/key-requests',
  ];
  for (const path of refused) {
    const res = await page.request.get(path, { headers: bearer(tech) });
    expect(res.status(), path).toBe(403);
  }
  const create = await page.request.post('/api/work-orders', { headers: bearer(tech), data: {} });
  expect(create.status()).toBe(403);
});

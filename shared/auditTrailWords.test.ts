import { describe, expect, test } from 'vitest';
import { actionName, detailLine } from './auditTrailWords';

// Common practice for audit trails (OWASP logging cheat sheet: logs a person can read): names, not codes or JSON.
describe('detailLine', () => {
  test.each([
    ['bittings.viewed', { what: 'keys', count: 85 }, 'the key bittings (85)'],
    ['work-order.updated', { fields: ['title', 'dueDate'], assigneeId: 'u1' }, 'changed title, due date · assigned to Ada Quill'],
    ['work-order.cancelled', { released: ['CR-1001', 'CR-1002'] }, 'released CR-1001, CR-1002'],
    ['completions.exported', { filter: { result: 'failed', from: '2026-12-01' } }, 'filter: result: failed; from: 2026-12-01'],
    ['user.updated', { active: true }, 'active: yes'],
    ['auth.sign-out', {}, ''],
  ])('%s %j reads "%s" (common practice)', (action, details, line) => {
    const line2 = detailLine(action, details, (id) => (id === 'u1' ? 'Ada Quill' : undefined));
    expect(line2).toBe(line);
    expect(line2).not.toMatch(/[{}"]/);
  });
  test('a role or a key level reads by its name, not its stored value (common practice)', () => {
    expect(detailLine('user.invited', { role: 'admin' })).toBe('role: Administrator');
    expect(detailLine('user.updated', { role: 'supervisor', active: false })).toBe('role: Supervisor · active: no');
    expect(detailLine('key.updated', { level: 'gm' })).toBe('level: Grand master');
  });
  test('an action reads as words, listed or not (common practice)', () => {
    expect(actionName('door.retired')).toBe('Retired a door');
    expect(actionName('widget.frobbed')).toBe('Widget frobbed');
  });
});

import { describe, expect, test } from 'vitest';
import { checkKeyAction, stepKeyAction, type KeyPress } from './keys';

const press = (key: string, more: Partial<KeyPress> = {}): KeyPress => ({
  key, repeat: false, ctrlKey: false, altKey: false, metaKey: false, inTextOrDialog: false, onControl: false, ...more,
});

// brand.md: every Bench step advances by Space/Enter and arrows, so a foot pedal or a
// page-turner remote (which sends PageDown/PageUp) works hands-free.
describe('Bench keys', () => {
  test.each([
    [' ', 'next'], ['Enter', 'next'], ['ArrowRight', 'next'], ['PageDown', 'next'],
    ['ArrowLeft', 'back'], ['PageUp', 'back'], ['Backspace', 'back'], ['x', null], ['Tab', null],
  ])('step card: %j → %s', (key, action) => {
    expect(stepKeyAction(press(key))).toBe(action);
  });

  // WAI-ARIA APG (button pattern): Space and Enter activate the focused button, so the
  // card must not also act on them, or one press would count twice.
  test('Space and Enter on a focused button are left to the button; the pedal keys still work', () => {
    expect(stepKeyAction(press(' ', { onControl: true }))).toBeNull();
    expect(stepKeyAction(press('Enter', { onControl: true }))).toBeNull();
    expect(stepKeyAction(press('PageDown', { onControl: true }))).toBe('next');
  });

  test('typing in a field or a dialog, held keys and browser shortcuts are ignored', () => {
    expect(stepKeyAction(press('Backspace', { inTextOrDialog: true }))).toBeNull();
    expect(stepKeyAction(press('PageDown', { repeat: true }))).toBeNull();
    expect(stepKeyAction(press('ArrowLeft', { altKey: true }))).toBeNull();
    expect(checkKeyAction(press('p', { inTextOrDialog: true }))).toBeNull();
  });

  // Our rule: a Key check result is a judgement, so no pedal key can record a pass.
  test.each([
    ['p', 'pass'], ['P', 'pass'], ['f', 'fail'], ['F', 'fail'], ['PageUp', 'back'],
    ['Enter', null], [' ', null], ['ArrowRight', null], ['PageDown', null],
  ])('Key check card: %j → %s', (key, action) => {
    expect(checkKeyAction(press(key))).toBe(action);
  });
});

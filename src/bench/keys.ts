/**
 * Keys the Bench answers to. A foot pedal or a page-turner remote sends ordinary key
 * presses (PageDown/PageUp or arrows), so every loading step can be advanced hands-free.
 * A Key check result is a judgement, so it takes its own letters and never a pedal key.
 */

export type StepKeyAction = 'next' | 'back';
export type CheckKeyAction = 'pass' | 'fail' | 'back';

/** What the handler needs from a KeyboardEvent, so the mapping is tested without a DOM. */
export interface KeyPress {
  key: string;
  repeat: boolean;
  ctrlKey: boolean;
  altKey: boolean;
  metaKey: boolean;
  /** The focused element is a text field, inside a dialog, or contenteditable. */
  inTextOrDialog: boolean;
  /** The focused element is a button or link: Space and Enter already press it. */
  onControl: boolean;
}

const stepKeys: Record<string, StepKeyAction> = {
  ' ': 'next', Enter: 'next', ArrowRight: 'next', PageDown: 'next',
  ArrowLeft: 'back', PageUp: 'back', Backspace: 'back',
};

const checkKeys: Record<string, CheckKeyAction> = {
  p: 'pass', P: 'pass', f: 'fail', F: 'fail',
  ArrowLeft: 'back', PageUp: 'back', Backspace: 'back',
};

function ignored(press: KeyPress): boolean {
  // A held pedal repeats: one press, one step. Shortcuts with modifiers belong to the browser.
  return press.repeat || press.ctrlKey || press.altKey || press.metaKey || press.inTextOrDialog;
}

export function stepKeyAction(press: KeyPress): StepKeyAction | null {
  if (ignored(press)) return null;
  if (press.onControl && (press.key === ' ' || press.key === 'Enter')) return null;
  return stepKeys[press.key] ?? null;
}

export function checkKeyAction(press: KeyPress): CheckKeyAction | null {
  if (ignored(press)) return null;
  return checkKeys[press.key] ?? null;
}

/** Reads a KeyPress from a real event; the only DOM-aware part. */
export function keyPressOf(event: KeyboardEvent): KeyPress {
  const target = event.target instanceof Element ? event.target : null;
  const text = target?.closest('input, textarea, select, [contenteditable=""], [contenteditable="true"]') ?? null;
  const dialog = target?.closest('[role="dialog"], .q-dialog') ?? null;
  // An open dialog or menu anywhere (even without focus inside) has the technician's attention.
  const overlay = typeof document === 'undefined' ? null : document.querySelector('.q-dialog, .q-menu, [role="dialog"]');
  return {
    key: event.key,
    repeat: event.repeat,
    ctrlKey: event.ctrlKey,
    altKey: event.altKey,
    metaKey: event.metaKey,
    inTextOrDialog: text !== null || dialog !== null || overlay !== null,
    onControl: target?.closest('button, a[href], [role="button"]') != null,
  };
}

/** Listens on the window while a card is shown; returns the function that stops listening. */
export function listenForKeys<A extends string>(map: (press: KeyPress) => A | null, act: (action: A) => void): () => void {
  const onKey = (event: KeyboardEvent): void => {
    const action = map(keyPressOf(event));
    if (!action) return;
    event.preventDefault();
    act(action);
  };
  window.addEventListener('keydown', onKey);
  return () => window.removeEventListener('keydown', onKey);
}

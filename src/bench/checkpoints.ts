/**
 * Words for the steps that are not one part: the level check, the springs and the caps
 * (keying-primer bench procedure steps 3 to 5). One table so every card says it the same way.
 */
import type { BenchStepKind } from '@shared/schemas/sync';

export type CheckpointKind = Extract<BenchStepKind, 'level-check' | 'springs' | 'cap'>;

export const checkpointWords: Record<CheckpointKind, { title: string; say: string; detail: string; done: string }> = {
  'level-check': {
    title: 'Level check',
    say: 'Look across the chambers: every stack must stand level at the top.',
    detail: 'A stack higher or lower than the others has a wrong or missing part: redo that chamber.',
    done: 'All level',
  },
  springs: {
    title: 'Springs',
    say: 'Put a spring on every stack.',
    detail: 'Next comes the Key check, before the caps go on.',
    done: 'Springs in',
  },
  cap: {
    title: 'Caps',
    say: 'Cap every chamber and seat the caps.',
    detail: 'Then every key is checked again.',
    done: 'Caps seated',
  },
};

export function isCheckpoint(kind: BenchStepKind): kind is CheckpointKind {
  return kind === 'level-check' || kind === 'springs' || kind === 'cap';
}

import { describe, expect, it } from 'vitest';
import { tagKeyLine, tagText } from './tagText';

describe('core tag text', () => {
  it('the QR code holds the tag id and the door, nothing else (a tag is public: common practice)', () => {
    expect(tagText('CR-12', 'AH-106')).toBe('CORE CR-12\nDOOR AH-106');
    expect(tagText('CR-12', null)).toBe('CORE CR-12\nDOOR -');
  });

  it('the printed key line names the change key symbol, and the cross-keyed one beside it', () => {
    expect(tagKeyLine('AA1')).toBe('Key AA1');
    expect(tagKeyLine('AA1', 'AB3')).toBe('Keys AA1 + AB3');
    expect(tagKeyLine(null)).toBe('Key —');
  });
});

/**
 * The CSV columns the importers read, and the templates offered for download: the header row,
 * then lines starting with # that say the allowed values and show an example. The importers
 * skip # lines, so a template uploaded as it is previews cleanly with no rows.
 */
export const DOOR_COLUMNS = ['site', 'building', 'floor', 'room', 'label', 'fire_rated', 'key_system', 'key_symbol', 'notes'] as const;
export const KEY_COLUMNS = ['symbol', 'level', 'parent', 'bitting', 'status', 'cross_keyed', 'notes'] as const;
/** Level words the bitting-list import takes, each to its level. */
export const LEVEL_WORDS = { ggm: 'ggm', 'great-grand-master': 'ggm', gm: 'gm', 'grand-master': 'gm', master: 'master', m: 'master', change: 'change', cr: 'change', 'change-key': 'change' } as const;

const comment = (lines: string[]) => lines.map((l) => `# ${l}`);
const crlf = (lines: string[]) => `${lines.join('\r\n')}\r\n`;

export function doorTemplateCsv(systemNames: string[] = []): string {
  return crlf([
    DOOR_COLUMNS.join(','),
    ...comment([
      'Lines starting with # are skipped. Put one door per line under the header; keep the header as it is.',
      'site, building, label: required. label: 1 to 40 letters, digits, spaces, dots, dashes or slashes; unique.',
      'floor: up to 20 characters. room: up to 40. notes: up to 1000.',
      'fire_rated: yes or no (also 1/0, true/false, x or empty).',
      `key_system: the key system's name exactly${systemNames.length ? ` (${systemNames.join(' | ')})` : ''}; may be empty.`,
      'key_symbol: the change key this door takes, like AA1; needs key_system.',
      'Example: Main campus,Birchwood Library,1,101,BL-101,no,Quillon Hill College,AA1,Reading room',
    ]),
  ]);
}

export interface TemplateProfile {
  chambers: number;
  minDepth: number;
  maxDepth: number;
}

export function keyTemplateCsv(profile?: TemplateProfile): string {
  const digits = profile ? `${profile.chambers} digits, each ${profile.minDepth} to ${profile.maxDepth}` : 'one digit per position';
  return crlf([
    KEY_COLUMNS.join(','),
    ...comment([
      'Lines starting with # are skipped. Put one key per line under the header; keep the header as it is.',
      'symbol: 1 to 24 letters, digits or dashes, unique in the key system (A, AA, AA1).',
      'level: gm (grand master), master, change (change key), or ggm (great-grand master).',
      'parent: the symbol of the master the key hangs under (in this file or the key system); empty for the top master.',
      `bitting: ${digits}, position 1 first (nearest the bow). Not the control key's bitting.`,
      'status: active, lost or retired (empty means active). cross_keyed: yes or no. notes: up to 500 characters.',
      `Example: AA1,change,AA,${profile ? '1'.repeat(profile.chambers) : '1234567'},active,no,Room 101`,
    ]),
  ]);
}

export const HOLDER_COLUMNS = ['name', 'department', 'email', 'badge_id'] as const;

export function holderTemplateCsv(): string {
  return crlf([
    HOLDER_COLUMNS.join(','),
    ...comment([
      'Lines starting with # are skipped. Put one key holder per line under the header; keep the header as it is.',
      'name, department: required. A department not known yet is added.',
      'email: where reminders and key audits go; may be empty. badge_id: the employee or badge id, unique; may be empty.',
      'Example: Dana Example,Facilities,dana@example.test,B-1001',
    ]),
  ]);
}

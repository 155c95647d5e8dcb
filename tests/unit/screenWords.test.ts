/**
 * The words rules of the screens, checked over the source (issue 11: "every word right"):
 * no internal names shown (a stored enum, an id, `crossKeyed`, raw JSON), one name per key level
 * (shared/keyLevels.ts), and symbols, tags and labels sorted naturally. Each scanner is first shown
 * a line it must flag, so a scanner that finds nothing cannot pass by accident.
 */
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const root = path.resolve(import.meta.dirname, '../..');

function filesUnder(dir: string, ext: RegExp): string[] {
  return readdirSync(path.join(root, dir), { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile() && ext.test(e.name) && !e.name.includes('.test.'))
    .map((e) => path.relative(root, path.join(e.parentPath, e.name)));
}

const screens = [...filesUnder('src', /\.vue$/), ...filesUnder('src', /\.ts$/)].filter((f) => !f.includes('/testing/'));
const wordsFiles = ['shared/words.ts', ...filesUnder('shared', /^audit\w*Words\.ts$/), 'server/services/mail.ts'];

/** Code without its comments: a comment may name the internals it explains. */
const uncommented = (s: string) => s.replace(/<!--[\s\S]*?-->/g, '').replace(/\/\*[\s\S]*?\*\//g, '').replace(/(^|[^:'"`])\/\/.*$/gm, '$1');

/** Fields that hold stored values (enums, ids, flags): shown bare, a person reads our internals. */
const INTERNAL = /^(?!fields\.|errs\.|errors\.)[\w.?!]+\.(crossKeyed|profileId|level|role|status|state|result|kind|action|details|id|userId|targetId)$/;

/**
 * What a person reads from a .vue file: text interpolations `{{ }}`, the bound words of a component
 * (`:label`, `:hint`, `:title`, `:caption`, `:message`, `:error-message`, `:aria-label`), and template
 * strings given as a label, message, title or caption in the script. Attributes such as data-test
 * and :key are not read by anyone and are left out.
 */
function shownExpressions(source: string): string[] {
  const s = uncommented(source);
  const out: string[] = [];
  const template = s.match(/<template>([\s\S]*)<\/template>/)?.[1] ?? '';
  for (const m of template.matchAll(/\{\{([\s\S]*?)\}\}/g)) out.push(m[1]!.trim());
  for (const m of template.matchAll(/\s:(?:label|hint|title|caption|message|error-message|aria-label|placeholder)="([^"]*)"/g)) out.push(m[1]!.trim());
  for (const m of s.matchAll(/\b(?:label|message|title|caption|hint)\s*:\s*`((?:[^`\\]|\\.)*)`/g)) out.push(`\`${m[1]}\``);
  // Inside template strings, each ${...} is shown on its own.
  return out.flatMap((e) => [e, ...[...e.matchAll(/\$\{([^{}]*)\}/g)].map((m) => m[1]!.trim())]);
}

/** A q-table column of a stored value with neither a format nor a slot of its own shows the value as stored. */
function rawColumns(source: string): string[] {
  const s = uncommented(source);
  if (/<template #body="/.test(s)) return [];
  return [...s.matchAll(/\{ name: '(\w+)',[^}]*field: '(crossKeyed|profileId|level|role|status|state|result|kind|action)'[^}]*\}/g)]
    .filter((m) => !m[0].includes('format:') && !s.includes(`#body-cell-${m[1]}=`))
    .map((m) => `column ${m[1]}`);
}

const internalsShown = (source: string) => [...shownExpressions(source).filter((e) => INTERNAL.test(e) || /JSON\.stringify/.test(e)), ...rawColumns(source)];

describe('no internal names on screen', () => {
  it('the scanner flags a bare stored value, an id and raw JSON, and lets words through', () => {
    const bad = `<template><span>{{ user.role }}</span><q-input :hint="row.profileId" /><b>{{ JSON.stringify(d) }}</b></template>
      <script setup lang="ts">const o = { label: \`\${k.symbol} (\${k.level})\` };
      const columns = [{ name: 'state', label: 'State', field: 'state', align: 'left' }, { name: 'result', field: 'result', format: (r) => words[r] }];</script>`;
    expect(internalsShown(bad)).toEqual(['user.role', 'JSON.stringify(d)', 'row.profileId', 'k.level', 'column state']);
    const good = `<template><span :data-test="\`row-\${r.id}\`">{{ ROLE_LABELS[user.role] }}</span><i>{{ k.crossKeyed ? '(cross-keyed)' : '' }}</i></template>`;
    expect(internalsShown(good)).toEqual([]);
  });

  it.each(screens.filter((f) => f.endsWith('.vue')))('%s shows no stored value, id, crossKeyed or raw JSON', (file) => {
    expect(internalsShown(readFileSync(path.join(root, file), 'utf8'))).toEqual([]);
  });
});

/** A key level written out by hand instead of taken from shared/keyLevels.ts. */
const LEVEL_WORDS = /\b(great[ -]grand[ -]master|grand[ -]master|master key)\b/i;
const stringsOf = (source: string) => [...uncommented(source).matchAll(/(['"`])((?:(?!\1)[^\\\n]|\\.)*)\1/g)].map((m) => m[2]!);
/** Template text between tags, where a level name would be typed into a .vue file. */
const textOf = (source: string) => (uncommented(source).match(/<template>([\s\S]*)<\/template>/)?.[1] ?? '').replace(/<[^>]*>/g, '\n').split('\n');
const handWrittenLevels = (source: string) => [...stringsOf(source), ...textOf(source)].filter((t) => LEVEL_WORDS.test(t)).map((t) => t.trim());

describe('one name per key level', () => {
  it('the scanner flags a level name typed by hand', () => {
    expect(handWrittenLevels(`const a = 'Grand master'; <template><b>Master key AA</b></template>`)).toEqual(['Grand master', 'Master key AA']);
    expect(handWrittenLevels(`const a = KEY_LEVEL_LABELS.gm; const t = 'Top master'; // grand master`)).toEqual([]);
  });

  it.each([...screens, ...wordsFiles])('%s takes every key level name from shared/keyLevels.ts', (file) => {
    expect(handWrittenLevels(readFileSync(path.join(root, file), 'utf8'))).toEqual([]);
  });
});

/** A list of symbols, tags, labels or buildings sorted as plain text: AA10 would come before AA2. */
const textSorts = (source: string) =>
  uncommented(source)
    .split('\n')
    .filter((l) => ((/\.sort\(\)/.test(l) || /localeCompare/.test(l)) && /symbol|tag|label|building|door/i.test(l)) || (/keys(\.value)?\.filter\(.*\.map\(\(k\) => \(\{ label/.test(l) && !/naturally\(/.test(l)))
    .map((l) => l.trim());

describe('symbols sort naturally', () => {
  it('the scanner flags a plain-text sort of symbols or labels', () => {
    expect(textSorts(`const b = [...new Set(doors.map((d) => d.building))].sort();\nkeys.sort((a, b) => a.symbol.localeCompare(b.symbol));\nlist.sort(naturalCompare);`)).toHaveLength(2);
    // a select's key options in the order the API happened to send them
    expect(textSorts('const o = computed(() => keys.value.filter((k) => k.level === x).map((k) => ({ label: k.symbol, value: k.id })));')).toHaveLength(1);
    expect(textSorts('const o = computed(() => naturally(keys.value.filter((k) => k.level === x), (k) => k.symbol).map((k) => ({ label: k.symbol, value: k.id })));')).toEqual([]);
  });

  it.each(screens)('%s sorts symbols, tags and labels with compareSymbols (AA2 before AA10)', (file) => {
    expect(textSorts(readFileSync(path.join(root, file), 'utf8'))).toEqual([]);
  });
});

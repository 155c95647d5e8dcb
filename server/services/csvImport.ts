/**
 * CSV imports (bitting lists and doors): parse, check every row, and answer a preview with
 * per-row errors (row number as a spreadsheet shows it, column, what is wrong). Committing
 * is all-or-nothing: one transaction, and only when no row has an error.
 */
import { parse as parseCsv } from 'csv-parse/sync';
import type { Knex } from 'knex';
import { auditSystem, placementChecker, readBitting } from '../../shared/keying';
import { systemAuditInputFor } from './systemAudit';
import { textProblem } from '../../shared/schemas/common';
import { DOOR_COLUMNS, HOLDER_COLUMNS, KEY_COLUMNS, LEVEL_WORDS } from '../../shared/csvTemplates';
import { DoorInput, KeyInput, KeyLevel } from '../../shared/schemas/records';
import { HolderInput } from '../../shared/schemas/keyControl';
import { badRequest } from '../errors';
import { createDoors } from './doors';
import { createHolders } from './keyHolders';
import { addKeys, loadSystem, placementSystemOf, type LoadedSystem } from './keySystems';
import type { Sealer } from './secrets';

export interface RowError {
  row: number;
  column: string | null;
  message: string;
}

export interface ImportResult {
  rows: number;
  errors: RowError[];
  /** Not wrong, but worth a look before committing (for keys: cores a new key would open). */
  warnings: RowError[];
  preview: Record<string, string | boolean | null>[];
  committed: boolean;
  created: number;
}

/** The answer for a file with a header and no rows yet (a template as downloaded). */
const nothingYet: ImportResult = { rows: 0, errors: [], warnings: [], preview: [], committed: false, created: 0 };

/** Each record with the line it ends on: the row number a spreadsheet shows (blank lines count). */
type CsvRow = Record<string, string> & { __row: number };

function readCsv(buffer: Buffer, required: string[], known: string[]): CsvRow[] {
  let records: CsvRow[];
  let header: string[];
  try {
    const parsed: { record: Record<string, string>; info: { lines: number } }[] = parseCsv(buffer, { columns: (h: string[]) => h.map((c) => c.trim().toLowerCase().replace(/[\s-]+/g, '_')), skip_empty_lines: true, comment: '#', comment_no_infix: true, trim: true, bom: true, max_record_size: 4096, info: true });
    records = parsed.map(({ record, info }) => ({ ...record, __row: info.lines }) as CsvRow);
    header = headerOf(buffer);
  } catch (err) {
    throw badRequest(`The file is not readable CSV: ${(err as Error).message}. Save it as CSV (comma-separated, UTF-8) with a header row.`);
  }
  // A template as downloaded (header and # lines only) is readable; it just has nothing to add yet.
  if (!records.length && !header.length) throw badRequest('The file has no header row. Start with the template: download it beside the import.');
  const missing = required.filter((c) => !header.includes(c));
  if (missing.length) throw badRequest(`The header lacks the column(s) ${missing.join(', ')}. Expected columns: ${known.join(', ')}.`, missing.map((c) => ({ field: c, message: 'missing column' })));
  const unknown = header.filter((c) => !known.includes(c));
  if (unknown.length) throw badRequest(`Unknown column(s) ${unknown.join(', ')}. Expected columns: ${known.join(', ')}.`, unknown.map((c) => ({ field: c, message: 'unknown column' })));
  if (records.length > 5000) throw badRequest('At most 5,000 rows per import; split the file.');
  return records;
}

/**
 * Cells holding controls (NUL cannot be stored) or, outside notes, invisible and
 * direction-changing characters (a label that shows as another): one error per cell, with
 * the row, so the sheet can be fixed; such rows are not checked further.
 */
function cellProblems(records: CsvRow[]): { errors: RowError[]; bad: Set<number> } {
  const errors: RowError[] = [];
  const bad = new Set<number>();
  records.forEach((r, i) => {
    for (const [column, value] of Object.entries(r)) {
      if (column === '__row' || typeof value !== 'string') continue;
      const problem = textProblem(value, column === 'notes' ? { lines: true } : { names: true });
      if (!problem) continue;
      errors.push({ row: r.__row, column, message: problem });
      bad.add(i);
    }
  });
  return { errors, bad };
}

function headerOf(buffer: Buffer): string[] {
  const first: string[][] = parseCsv(buffer, { to: 1, bom: true, trim: true, skip_empty_lines: true, comment: '#', comment_no_infix: true, relax_column_count: true });
  return (first[0] ?? []).map((c) => c.trim().toLowerCase().replace(/[\s-]+/g, '_'));
}

const yes = (v: string | undefined) => /^(1|y|yes|true|x)$/i.test((v ?? '').trim());

const levelWords: Record<string, KeyLevel> = LEVEL_WORDS;

/**
 * The system audit run with the new keys added: a new key whose every cut is among an
 * existing core's operating depths would open that core (an openings-count key). Not an
 * error (cross-keying can be meant), but the administrator sees it before committing.
 */
async function incidentalAccess(db: Knex, sealer: Sealer, systemId: string, keys: { symbol: string; bitting: string }[], records: CsvRow[]): Promise<RowError[]> {
  const { profile, audit } = await systemAuditInputFor(db, sealer, systemId);
  const fresh = keys.map((k, i) => ({ id: `import:${i}`, symbol: k.symbol, bitting: k.bitting, level: undefined, opens: [] as string[] }));
  const findings = auditSystem(profile, { ...audit, keys: [...audit.keys, ...fresh.map(({ level: _l, ...k }) => k)] });
  const out: RowError[] = [];
  for (const f of findings) {
    if (f.code !== 'unintended-access') continue;
    for (const id of f.keyIds ?? []) {
      const i = id.startsWith('import:') ? Number(id.slice(7)) : -1;
      if (i >= 0) out.push({ row: records[i]!.__row, column: 'bitting', message: f.message });
    }
  }
  return out;
}

/**
 * The engine's hierarchy rules (checkKeyPlacement) for every row without another error,
 * against the system with the whole file added: a row may hang under a key of the file.
 */
function hierarchyErrors(system: LoadedSystem, rows: (KeyInput & { parentSymbol: string | null })[], rowNumbers: number[], wrong: Set<number>): RowError[] {
  const idOf = new Map(system.keys.map((k) => [k.symbol.toUpperCase(), k.id]));
  rows.forEach((k, i) => { if (!idOf.has(k.symbol)) idOf.set(k.symbol, `import:${i}`); });
  const fresh = rows.map((k, i) => ({
    id: `import:${i}`, symbol: k.symbol, level: k.level, status: k.status ?? 'active', crossKeyed: false, notes: null,
    parentId: k.parentSymbol ? (idOf.get(k.parentSymbol) ?? null) : null, bitting: k.bitting.trim(),
  }));
  const check = placementChecker(system.profile, placementSystemOf({ control: system.control, keys: [...system.keys, ...fresh] }));
  const out: RowError[] = [];
  fresh.forEach((k, i) => {
    const row = rows[i]!;
    if (wrong.has(rowNumbers[i]!) || (row.parentSymbol && !idOf.has(row.parentSymbol))) return; // its other problems first
    for (const p of check({ id: k.id, bitting: k.bitting, parentId: k.parentId })) {
      out.push({ row: rowNumbers[i]!, column: p.field === 'parentId' ? 'parent' : 'bitting', message: p.message });
    }
  });
  return out;
}


export async function importKeys(db: Knex, sealer: Sealer, systemId: string, file: Buffer, commit: boolean): Promise<ImportResult> {
  const system = await loadSystem(db, sealer, systemId);
  const records = readCsv(file, ['symbol', 'level', 'bitting'], [...KEY_COLUMNS]);
  if (!records.length) return nothingYet;
  const { errors, bad } = cellProblems(records);
  const existing = new Set(system.keys.map((k) => k.symbol.toUpperCase()));
  const levelOf = new Map(system.keys.map((k) => [k.symbol.toUpperCase(), k.level]));
  const inFile = new Map<string, number>();
  records.forEach((r, i) => {
    const s = (r.symbol ?? '').toUpperCase();
    if (s && !inFile.has(s)) inFile.set(s, i);
  });
  const parsed: (KeyInput & { parentSymbol: string | null })[] = [];
  const parsedRows: number[] = [];
  records.forEach((r, i) => {
    if (bad.has(i)) return;
    const row = r.__row;
    const level = levelWords[(r.level ?? '').trim().toLowerCase()];
    const result = KeyInput.safeParse({
      symbol: r.symbol,
      level: level ?? r.level,
      bitting: r.bitting,
      status: r.status ? r.status.toLowerCase() : undefined,
      crossKeyed: yes(r.cross_keyed),
      ...(r.notes ? { notes: r.notes } : {}),
    });
    if (!result.success) {
      for (const issue of result.error.issues) {
        const col = String(issue.path[0] ?? '');
        errors.push({ row, column: col === 'crossKeyed' ? 'cross_keyed' : col || null, message: col === 'level' ? 'level is ggm, gm, master or change' : issue.message });
      }
      return;
    }
    const k = result.data;
    const reading = readBitting(system.profile, k.bitting);
    if (!reading.ok) errors.push({ row, column: 'bitting', message: reading.message });
    const symbol = k.symbol.toUpperCase();
    if (existing.has(symbol)) errors.push({ row, column: 'symbol', message: `${symbol} is in the key system already` });
    if (inFile.get(symbol) !== i) errors.push({ row, column: 'symbol', message: `${symbol} appears more than once in the file (first on row ${records[inFile.get(symbol)!]!.__row})` });
    const parent = (r.parent ?? '').trim().toUpperCase() || null;
    if (parent && !existing.has(parent) && !inFile.has(parent)) errors.push({ row, column: 'parent', message: `no key ${parent} in the file or the key system` });
    const parentLevel = parent ? (levelOf.get(parent) ?? levelWords[(records[inFile.get(parent) ?? -1]?.level ?? '').trim().toLowerCase()]) : undefined;
    if (parentLevel === 'change') errors.push({ row, column: 'parent', message: `${parent} is a change key; a key hangs under a master` });
    if (parent && parent === symbol) errors.push({ row, column: 'parent', message: 'a key cannot be its own parent' });
    parsed.push({ ...k, symbol, parentSymbol: parent });
    parsedRows.push(row);
  });
  errors.push(...hierarchyErrors(system, parsed, parsedRows, new Set(errors.map((e) => e.row))));
  errors.sort((a, b) => a.row - b.row);
  const rank = { ggm: 0, gm: 1, master: 2, change: 3 } as const;
  const preview = parsed.map((k) => ({ symbol: k.symbol, level: k.level, parent: k.parentSymbol, status: k.status, crossKeyed: k.crossKeyed }));
  const warnings = errors.length ? [] : await incidentalAccess(db, sealer, systemId, parsed, records);
  if (!commit || errors.length) return { rows: records.length, errors, warnings, preview, committed: false, created: 0 };
  const ordered = [...parsed].sort((a, b) => rank[a.level] - rank[b.level]);
  const ids = await addKeys(db, sealer, systemId, ordered);
  return { rows: records.length, errors, warnings, preview, committed: true, created: ids.length };
}


export async function importDoors(db: Knex, file: Buffer, commit: boolean): Promise<ImportResult> {
  const records = readCsv(file, ['site', 'building', 'label'], [...DOOR_COLUMNS]);
  if (!records.length) return nothingYet;
  const systems = new Map((await db('key_systems').select('id', 'name')).map((s: { id: string; name: string }) => [s.name.toLowerCase(), s.id]));
  const keys = await db('keys').select('id', 'symbol', 'key_system_id');
  const existing = new Set((await db('doors').pluck('label')).map((l: string) => l.toLowerCase()));
  const seen = new Map<string, number>();
  const { errors, bad } = cellProblems(records);
  const parsed: DoorInput[] = [];
  records.forEach((r, i) => {
    if (bad.has(i)) return;
    const row = r.__row;
    let keySystemId: string | null = null;
    let keyId: string | null = null;
    if (r.key_system) {
      keySystemId = systems.get(r.key_system.toLowerCase()) ?? null;
      if (!keySystemId) errors.push({ row, column: 'key_system', message: `no key system named "${r.key_system}"` });
    }
    if (r.key_symbol) {
      if (!keySystemId) errors.push({ row, column: 'key_symbol', message: 'a key symbol needs the key_system column too' });
      else {
        keyId = keys.find((k: { symbol: string; key_system_id: string }) => k.key_system_id === keySystemId && k.symbol.toUpperCase() === r.key_symbol!.toUpperCase())?.id ?? null;
        if (!keyId) errors.push({ row, column: 'key_symbol', message: `no key ${r.key_symbol.toUpperCase()} in ${r.key_system}` });
      }
    }
    const result = DoorInput.safeParse({ site: r.site, building: r.building, floor: r.floor ?? '', room: r.room ?? '', label: r.label, fireRated: yes(r.fire_rated), keySystemId, keyId, ...(r.notes ? { notes: r.notes } : {}) });
    if (!result.success) {
      for (const issue of result.error.issues) errors.push({ row, column: String(issue.path[0] ?? '') || null, message: issue.message });
      return;
    }
    const label = result.data.label.toLowerCase();
    if (existing.has(label)) errors.push({ row, column: 'label', message: `a door labelled "${result.data.label}" exists already` });
    if (seen.has(label)) errors.push({ row, column: 'label', message: `"${result.data.label}" appears more than once (first on row ${records[seen.get(label)!]!.__row})` });
    else seen.set(label, i);
    parsed.push(result.data);
  });
  const preview = parsed.map((d) => ({ label: d.label, site: d.site, building: d.building, floor: d.floor, room: d.room, fireRated: d.fireRated }));
  if (!commit || errors.length) return { rows: records.length, errors, warnings: [], preview, committed: false, created: 0 };
  const ids = await createDoors(db, parsed);
  return { rows: records.length, errors, warnings: [], preview, committed: true, created: ids.length };
}

/** Key holders: name and department required, e-mail and badge id checked; all or nothing. */
export async function importHolders(db: Knex, file: Buffer, commit: boolean): Promise<ImportResult> {
  const records = readCsv(file, ['name', 'department'], [...HOLDER_COLUMNS]);
  if (!records.length) return nothingYet;
  const { errors, bad } = cellProblems(records);
  const badges = new Set(((await db('key_holders').whereNotNull('badge_id').pluck('badge_id')) as string[]).map((b) => b.toLowerCase()));
  const seen = new Map<string, number>();
  const parsed: HolderInput[] = [];
  records.forEach((r, i) => {
    if (bad.has(i)) return;
    const row = r.__row;
    const result = HolderInput.safeParse({ name: r.name, department: r.department, ...(r.email ? { email: r.email } : {}), ...(r.badge_id ? { badgeId: r.badge_id } : {}) });
    if (!result.success) {
      for (const issue of result.error.issues) {
        const col = String(issue.path[0] ?? '');
        errors.push({ row, column: col === 'badgeId' ? 'badge_id' : col || null, message: issue.message });
      }
      return;
    }
    const badge = result.data.badgeId?.toLowerCase();
    if (badge && badges.has(badge)) errors.push({ row, column: 'badge_id', message: `badge id ${result.data.badgeId} belongs to a key holder already` });
    if (badge && seen.has(badge)) errors.push({ row, column: 'badge_id', message: `badge id ${result.data.badgeId} appears more than once (first on row ${records[seen.get(badge)!]!.__row})` });
    else if (badge) seen.set(badge, i);
    parsed.push(result.data);
  });
  errors.sort((a, b) => a.row - b.row);
  const preview = parsed.map((h) => ({ name: h.name, department: h.department, email: h.email ?? null, badgeId: h.badgeId ?? null }));
  if (!commit || errors.length) return { rows: records.length, errors, warnings: [], preview, committed: false, created: 0 };
  const ids = await createHolders(db, parsed);
  return { rows: records.length, errors, warnings: [], preview, committed: true, created: ids.length };
}

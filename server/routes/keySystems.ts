import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import { auditSystem } from '../../shared/keying';
import { Id, Notes } from '../../shared/schemas/common';
import { KeyInput, KeyReplace, KeySystemCreate, KeySystemUpdate, KeyUpdate, ProgressionInput } from '../../shared/schemas/records';
import type { Ctx } from '../context';
import { badRequest } from '../errors';
import { actorOf, allow } from '../middleware/auth';
import { upload } from '../middleware/upload';
import { parse } from '../middleware/validate';
import { audit } from '../services/auditTrail';
import { acknowledge, withAcknowledgements } from '../services/systemAuditAcknowledgements';
import { importKeys } from '../services/csvImport';
import { coresOperatedBy } from '../services/keyDoors';
import { addKeys, replaceKey, createSystem, getSystem, listKeys, listSystems, loadSystem, updateKey, updateSystem } from '../services/keySystems';
import { previewProgression } from '../services/progression';
import { systemAuditInputFor } from '../services/systemAudit';

const IdParam = z.object({ id: Id });
const Reveal = z.object({ reveal: z.enum(['0', '1']).optional() });
const Acknowledge = z.strictObject({
  fingerprint: z.string().regex(/^[0-9a-f]{64}$/, { error: 'the fingerprint of a finding from this key system’s system audit (64 hex digits)' }),
  note: Notes(500, 'the note').pipe(z.string().min(3, { error: 'write why the finding is accepted (3 to 500 characters)' })),
});

/** `/api/key-systems/:id/audit[/...]` → `/api/key-systems/:id/system-audit[/...]`, the query kept. */
function movedToSystemAudit(req: Request, res: Response): void {
  parse(IdParam, req.params);
  res.redirect(308, req.originalUrl.replace(/^(\/api\/key-systems\/[^/?]+)\/audit(?=[/?]|$)/, '$1/system-audit'));
}

export function keySystemsRouter({ db, sealer, config }: Ctx): Router {
  const r = Router();
  /** The system audit as the console shows it: each finding with its fingerprint and any acknowledgement. */
  async function currentSystemAudit(id: string) {
    const input = await systemAuditInputFor(db, sealer, id);
    const findings = await withAcknowledgements(db, id, config.dataKey, input.audit, auditSystem(input.profile, input.audit));
    return { findings, keys: input.audit.keys.length, cores: input.audit.cores.length };
  }

  r.get('/key-systems', allow('supervisor', 'admin'), async (_req, res) => res.json({ keySystems: await listSystems(db) }));
  r.post('/key-systems', allow('admin'), async (req, res) => {
    const input = parse(KeySystemCreate, req.body, 'The key system');
    const id = await db.transaction(async (trx) => {
      const created = await createSystem(trx, sealer, input);
      await audit(trx, actorOf(req), 'key-system.created', { type: 'key-system', id: created }, { topMaster: input.topMaster?.symbol.toUpperCase() ?? null });
      return created;
    });
    res.status(201).json({ keySystem: await getSystem(db, id) });
  });
  r.get('/key-systems/:id', allow('supervisor', 'admin'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    const { reveal } = parse(Reveal, req.query);
    const keySystem = await getSystem(db, id);
    if (reveal === '1') {
      const system = await loadSystem(db, sealer, id);
      await audit(db, actorOf(req), 'bittings.viewed', { type: 'key-system', id }, { what: 'control' });
      return res.json({ keySystem: { ...keySystem, control: system.control } });
    }
    res.json({ keySystem });
  });
  r.patch('/key-systems/:id', allow('admin'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    const input = parse(KeySystemUpdate, req.body, 'The key system');
    await db.transaction(async (trx) => {
      await updateSystem(trx, sealer, id, input);
      await audit(trx, actorOf(req), input.control ? 'key-system.control-changed' : 'key-system.updated', { type: 'key-system', id });
    });
    res.json({ keySystem: await getSystem(db, id) });
  });

  r.get('/key-systems/:id/keys', allow('supervisor', 'admin'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    const reveal = parse(Reveal, req.query).reveal === '1';
    const keys = await listKeys(db, sealer, id, reveal);
    if (reveal) await audit(db, actorOf(req), 'bittings.viewed', { type: 'key-system', id }, { what: 'keys', count: keys.length });
    res.json({ keys });
  });
  r.post('/key-systems/:id/keys', allow('admin'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    const body = req.body as { keys?: unknown };
    const inputs = Array.isArray(body?.keys) ? parse(z.array(KeyInput).min(1).max(2000), body.keys, 'The keys') : [parse(KeyInput, req.body, 'The key')];
    const ids = await db.transaction(async (trx) => {
      const added = await addKeys(trx, sealer, id, inputs);
      await audit(trx, actorOf(req), 'keys.added', { type: 'key-system', id }, { count: added.length });
      return added;
    });
    res.status(201).json({ ids });
  });
  r.patch('/key-systems/:id/keys/:keyId', allow('admin'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    const keyId = parse(Id, req.params.keyId, 'The key id');
    const input = parse(KeyUpdate, req.body, 'The key');
    await db.transaction(async (trx) => {
      await updateKey(trx, sealer, id, keyId, input);
      const action = input.bitting ? 'key.bitting-changed' : input.status === 'retired' ? 'key.retired' : 'key.updated';
      await audit(trx, actorOf(req), action, { type: 'key', id: keyId }, { fields: Object.keys(input).filter((k) => k !== 'bitting'), status: input.status });
    });
    res.json({ ok: true });
  });

  /** The cores and doors a key turns (engine keyOperates), each intended or incidental; no bitting in the answer. */
  r.get('/key-systems/:id/keys/:keyId/operates', allow('supervisor', 'admin'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    const keyId = parse(Id, req.params.keyId, 'The key id');
    res.json({ cores: await coresOperatedBy(db, sealer, id, keyId) });
  });
  r.post('/key-systems/:id/keys/:keyId/replace', allow('admin'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    const keyId = parse(Id, req.params.keyId, 'The key id');
    const input = parse(KeyReplace, req.body, 'The replacement');
    const out = await db.transaction(async (trx) => {
      const replaced = await replaceKey(trx, sealer, id, keyId, input);
      await audit(trx, actorOf(req), 'key.replaced', { type: 'key', id: keyId }, { by: replaced.symbol, old: input.oldStatus, doors: replaced.doors.length, coresToRekey: replaced.coresToRekey.length });
      return replaced;
    });
    res.status(201).json(out);
  });

  /** A preview only: nothing is saved. It lists bittings, so the read is audited. */
  r.post('/key-systems/:id/progression', allow('admin'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    const input = parse(ProgressionInput, req.body, 'The progression');
    const preview = await previewProgression(db, sealer, id, input);
    await audit(db, actorOf(req), 'bittings.viewed', { type: 'key-system', id }, { what: 'progression-preview', count: preview.keys.length + preview.held.length });
    res.json(preview);
  });

  r.post('/key-systems/:id/import', allow('admin'), upload.single('file'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    if (!req.file) throw badRequest('Attach the CSV file as the form field "file".', [{ field: 'file', message: 'missing' }]);
    const commit = req.query.commit === '1';
    const result = await db.transaction(async (trx) => {
      const outcome = await importKeys(trx, sealer, id, req.file!.buffer, commit);
      if (outcome.committed) await audit(trx, actorOf(req), 'keys.imported', { type: 'key-system', id }, { count: outcome.created });
      return outcome;
    });
    res.status(result.errors.length ? 422 : 200).json(result);
  });

  r.get('/key-systems/:id/system-audit', allow('supervisor', 'admin'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    const result = await currentSystemAudit(id);
    const acknowledged = result.findings.filter((f) => f.acknowledged).length;
    await audit(db, actorOf(req), 'key-system.audited', { type: 'key-system', id }, { findings: result.findings.length, acknowledged });
    res.json(result);
  });

  /** An administrator accepts a warning or a note of the system audit, with a note; it stays accepted until its keys change. */
  r.post('/key-systems/:id/system-audit/acknowledgements', allow('admin'), async (req, res) => {
    const { id } = parse(IdParam, req.params);
    const input = parse(Acknowledge, req.body, 'The acknowledgement');
    const { findings } = await currentSystemAudit(id);
    const finding = findings.find((f) => f.fingerprint === input.fingerprint);
    if (!finding) {
      throw badRequest('No finding of this key system’s current system audit has that fingerprint: the keys it involves may have changed since. Run the system audit again and acknowledge the finding it shows.', [{ field: 'fingerprint', message: 'not a finding of the current system audit' }]);
    }
    if (finding.severity === 'error') {
      throw badRequest('Errors cannot be acknowledged: fix what the finding names (its advice says how), then run the system audit again.', [{ field: 'fingerprint', message: 'the finding is an error' }]);
    }
    const user = req.user!;
    const acknowledgement = await db.transaction(async (trx) => {
      const made = await acknowledge(trx, { systemId: id, finding, note: input.note, user: { id: user.id, name: user.name } });
      await audit(trx, actorOf(req), 'audit-finding.acknowledged', { type: 'key-system', id }, { code: finding.code, fingerprint: finding.fingerprint, note: input.note });
      return made;
    });
    res.status(201).json({ fingerprint: finding.fingerprint, acknowledgement });
  });

  // The system audit's old paths (before it was named apart from the audit trail): a 308 keeps the method and
  // body, so an older client's GET and POST land on the new route, which checks the roles as before.
  r.get('/key-systems/:id/audit', movedToSystemAudit);
  r.post('/key-systems/:id/audit/acknowledgements', movedToSystemAudit);
  return r;
}

/**
 * The invented demo scenario for `npm start`: "Quillon Hill College", a fictional campus
 * of three buildings and 60 doors on a three-level system (grand master A, masters AA..AD,
 * change keys progressed with the engine, a control key), two work orders waiting for the
 * demo technician, a week of completion history, and key control (departments, holders,
 * issued keys, one open lost-key report: demoKeyControl.ts). Local demo only: it refuses to run
 * with NODE_ENV=production, and the demo accounts share one published password.
 */
import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { builtInProfiles, progressKeys } from '../../shared/keying';
import { hashPassword } from '../services/passwords';
import { CONTROL_SYMBOL, controlContext, keyContext, loadSystem } from '../services/keySystems';
import type { Sealer } from '../services/secrets';
import { createWorkOrder } from '../services/workOrders';
import { hashRecord } from '../services/canonical';
import { seedKeyControl } from './demoKeyControl';

export const DEMO_PASSWORD = 'corewright-demo';
export const demoUsers = [
  { email: 'tech@demo.corewright.test', name: 'Robin Tech (demo)', role: 'technician' },
  { email: 'lead@demo.corewright.test', name: 'Sam Lead (demo)', role: 'supervisor' },
  { email: 'admin@demo.corewright.test', name: 'Alex Admin (demo)', role: 'admin' },
] as const;
const extraTechnician = { email: 'bench2@demo.corewright.test', name: 'Jordan Bench (demo)', role: 'technician' } as const;

export async function isEmpty(db: Knex): Promise<boolean> {
  const row = await db('users').count<{ count: number }[]>({ count: '*' }).first();
  return Number(row?.count ?? 0) === 0;
}

const GM = '4628462';
const CONTROL = '7351735';
const masters = [
  { symbol: 'AA', bitting: '2428462', building: 'Aster Hall', code: 'AH' },
  { symbol: 'AB', bitting: '2828462', building: 'Birchwood Library', code: 'BL' },
  { symbol: 'AC', bitting: '6428462', building: 'Cinder Works', code: 'CW' },
  { symbol: 'AD', bitting: '6828462', building: 'Plant rooms (all buildings)', code: 'PR' },
];

interface SeedKey {
  id: string;
  symbol: string;
  level: 'gm' | 'master' | 'change';
  parent: string | null;
  bitting: string;
}

/** The demo accounts, all with DEMO_PASSWORD (its hash can be passed in: scrypt is slow on purpose). */
export async function seedUsers(db: Knex, withExtra = false, hash?: string): Promise<void> {
  hash ??= await hashPassword(DEMO_PASSWORD);
  const users = withExtra ? [...demoUsers, extraTechnician] : demoUsers;
  await db('users').insert(users.map((u) => ({ ...u, password_hash: hash })));
}

export async function seedDemo(db: Knex, sealer: Sealer): Promise<void> {
  if (process.env.NODE_ENV === 'production') throw new Error('The demo seed refuses to run with NODE_ENV=production: its accounts share a published password.');
  const profile = builtInProfiles['sfic-7']!;
  await db.transaction(async (trx) => {
    await seedUsers(trx, true);
    const ids = Object.fromEntries((await trx('users').select('email', 'id')).map((u: { email: string; id: string }) => [u.email, u.id]));
    const systemId = randomUUID();
    await trx('key_systems').insert({ id: systemId, name: 'Quillon Hill College', profile_id: profile.id, control_enc: sealer.seal(CONTROL, controlContext(systemId)), notes: 'Fictional demo campus. Three buildings, 60 openings.' });
    await trx('control_keys').insert({ key_system_id: systemId, symbol: CONTROL_SYMBOL });

    const keys: SeedKey[] = [{ id: randomUUID(), symbol: 'A', level: 'gm', parent: null, bitting: GM }];
    for (const m of masters) {
      const master: SeedKey = { id: randomUUID(), symbol: m.symbol, level: 'master', parent: keys[0]!.id, bitting: m.bitting };
      keys.push(master);
      // Total position progression in chambers 5-7 from the master (the engine's progressKeys).
      const changes = progressKeys(profile, { topMaster: m.bitting, progress: [5, 6, 7], control: CONTROL, limit: 64 }).filter((_, i) => i % 3 === 1).slice(0, 20);
      changes.forEach((bitting, i) => keys.push({ id: randomUUID(), symbol: `${m.symbol}${i + 1}`, level: 'change', parent: master.id, bitting }));
    }
    await trx('keys').insert(keys.map((k) => ({ id: k.id, key_system_id: systemId, symbol: k.symbol, level: k.level, parent_id: k.parent, bitting_enc: sealer.seal(k.bitting, keyContext(k.id)) })));
    const changeOf = (master: string, n: number) => keys.find((k) => k.symbol === `${master}${n}`)!;

    // 60 doors: 17 rooms in each building under its master, and one plant room per floor under AD.
    const doors: { id: string; label: string; keyId: string; building: string; fire: boolean }[] = [];
    for (const [bi, m] of masters.slice(0, 3).entries()) {
      for (let n = 1; n <= 17; n++) {
        const floor = n <= 6 ? 1 : n <= 12 ? 2 : 3;
        const room = `${floor}${String(n).padStart(2, '0')}`;
        const stair = n % 6 === 0;
        doors.push({ id: randomUUID(), label: `${m.code}-${room}`, keyId: changeOf(m.symbol, n).id, building: m.building, fire: stair });
      }
      doors.push({ id: randomUUID(), label: `${m.code}-PLANT`, keyId: changeOf('AD', bi + 1).id, building: m.building, fire: true });
    }
    for (let n = 1; n <= 6; n++) doors.push({ id: randomUUID(), label: `CW-SVC${n}`, keyId: changeOf('AD', n + 3).id, building: 'Cinder Works', fire: n % 2 === 0 });
    await trx('doors').insert(
      doors.map((d) => {
        const room = d.label.split('-')[1]!;
        return {
          id: d.id,
          site: 'Quillon Hill College',
          building: d.building,
          floor: /^\d/.test(room) ? room[0]! : 'B',
          room: /^\d/.test(room) ? room : room.toLowerCase(),
          label: d.label,
          fire_rated: d.fire,
          key_system_id: systemId,
          key_id: d.keyId,
          notes: d.fire ? 'Fire-rated opening: keep the listed hardware and free egress.' : null,
        };
      }),
    );

    const lead = ids['lead@demo.corewright.test']!;
    const tech = ids['tech@demo.corewright.test']!;
    const bench2 = ids['bench2@demo.corewright.test']!;
    const doorsOf = (prefix: string, from: number, count: number) => doors.filter((d) => d.label.startsWith(prefix)).slice(from, from + count).map((d) => ({ doorId: d.id, keyId: d.keyId }));
    const today = new Date();
    const inDays = (n: number) => new Date(today.getTime() + n * 86400_000).toISOString().slice(0, 10);

    // A finished work order with a week of history: built, checked, installed.
    const history = await createWorkOrder(trx, sealer, { title: 'Birchwood Library: building opening', purpose: 'new-building', keySystemId: systemId, assigneeId: bench2, dueDate: inDays(-2), doors: doorsOf('BL-', 0, 14) }, lead);
    const system = await loadSystem(trx, sealer, systemId);
    const cores = await trx('work_order_cores as x').join('cores as c', 'c.id', 'x.core_id').where('x.work_order_id', history.id).orderBy('x.position').select('c.id', 'c.door_id', 'c.tag');
    const chainSymbols = (doorId: string) => {
      const key = system.keys.find((k) => k.id === doors.find((d) => d.id === doorId)!.keyId)!;
      return { change: key.symbol, master: key.symbol.replace(/\d+$/, '') };
    };
    for (const [i, core] of cores.entries()) {
      const finished = new Date(today.getTime() - (7 - Math.floor(i / 2)) * 86400_000 + (9 + (i % 2) * 3) * 3600_000);
      const started = new Date(finished.getTime() - 14 * 60_000);
      const sym = chainSymbols(core.door_id);
      const at = (min: number) => new Date(started.getTime() + min * 60_000).toISOString();
      const checks = (phase: 'before-cap' | 'after-cap', t: number, failChange = false) => [
        { phase, role: 'change', symbol: sym.change, result: failChange ? 'failed' : 'passed', ...(failChange ? { note: 'would not turn' } : {}), at: at(t) },
        { phase, role: 'master', symbol: sym.master, result: 'passed', at: at(t + 0.5) },
        { phase, role: 'master', symbol: 'A', result: 'passed', at: at(t + 1) },
        { phase, role: 'control', symbol: 'CONTROL', result: 'passed', at: at(t + 1.5) },
        { phase, role: 'must-not-turn', symbol: 'AB20', result: 'passed', at: at(t + 2) },
      ];
      const steps = Array.from({ length: 7 }, (_, c) => ({ kind: 'bottom', chamber: c + 1, size: null, at: at(1 + c) }));
      const failedFirst = i === 3 || i === 9;
      const attempts = failedFirst
        ? [
            { n: 1, startedAt: at(0), finishedAt: at(6), result: 'failed', steps, keyChecks: checks('before-cap', 5, true).slice(0, 1) },
            { n: 2, startedAt: at(6), finishedAt: at(14), result: 'passed', steps, keyChecks: [...checks('before-cap', 9), ...checks('after-cap', 12)] },
          ]
        : [{ n: 1, startedAt: at(0), finishedAt: at(14), result: 'passed', steps, keyChecks: [...checks('before-cap', 8), ...checks('after-cap', 11)] }];
      const clientId = randomUUID();
      const record = { clientId, kind: 'completion', coreId: core.id, workOrderId: history.id, startedAt: started.toISOString(), finishedAt: finished.toISOString(), result: 'passed', attempts };
      await trx('completions').insert({
        id: clientId,
        core_id: core.id,
        work_order_id: history.id,
        technician_id: bench2,
        technician_name: 'Jordan Bench (demo)',
        core_tag: core.tag,
        door_id: core.door_id,
        door_label: doors.find((d) => d.id === core.door_id)!.label,
        started_at: started,
        finished_at: finished,
        result: 'passed',
        attempt_count: attempts.length,
        failed_checks: failedFirst ? 1 : 0,
        attempts: JSON.stringify(attempts),
        payload_hash: hashRecord(record),
        received_at: new Date(finished.getTime() + 3600_000),
      });
      const installId = randomUUID();
      const installedAt = new Date(finished.getTime() + 2 * 3600_000);
      await trx('installs').insert({ id: installId, core_id: core.id, door_id: core.door_id, removed_core_tag: null, installed_by: bench2, installed_at: installedAt, payload_hash: hashRecord({ clientId: installId, installedAt }) });
      await trx('cores').where({ id: core.id }).update({ state: 'installed' });
    }
    // Planned before its week of history (the server refuses work dated before its work order: reliability.md T5).
    await trx('work_orders').where({ id: history.id }).update({ status: 'done', created_at: new Date(today.getTime() - 10 * 86400_000) });

    // Two work orders waiting for the demo technician, planned three days ago.
    const aster = await createWorkOrder(trx, sealer, { title: 'Aster Hall: second-floor labs', purpose: 'new-building', keySystemId: systemId, assigneeId: tech, dueDate: inDays(2), notes: 'Labs 207-212. Room 212 is a fire-rated stair door.', doors: doorsOf('AH-', 6, 6) }, lead);
    const cinder = await createWorkOrder(trx, sealer, { title: 'Cinder Works: lost-key rekey of the service rooms', purpose: 'lost-key-rekey', keySystemId: systemId, assigneeId: tech, dueDate: inDays(1), notes: 'A service-room key was reported lost. Return the removed cores to the shop.', doors: doorsOf('CW-SVC', 0, 3) }, lead);
    await trx('work_orders').whereIn('id', [aster.id, cinder.id]).update({ created_at: new Date(today.getTime() - 3 * 86400_000) });

    await seedKeyControl(trx, sealer, systemId, lead);
  });
}

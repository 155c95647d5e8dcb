/**
 * Key control for the demo campus: departments with invented authorisers, key holders, key
 * copies issued (one overdue, one holder leaving) and one open lost-key report whose exposure
 * is computed through the engine like any other. Every name and address is invented.
 */
import type { Knex } from 'knex';
import { keyExposureOf } from '../services/keyExposure';
import type { Sealer } from '../services/secrets';

const departments = [
  { name: 'Library Services', authorisers: [{ name: 'Morgan Vale (demo)', email: 'morgan.vale@demo.corewright.test' }] },
  { name: 'Facilities', authorisers: [{ name: 'Jules Reed (demo)', email: 'jules.reed@demo.corewright.test' }] },
  { name: 'Aster Hall Labs', authorisers: [{ name: 'Noor Ashby (demo)', email: 'noor.ashby@demo.corewright.test' }] },
];

/** Holder, department, badge, status; then the keys they hold (symbol, due in days or none). */
const holders: { name: string; department: string; badge: string; status?: 'leaving'; keys: [string, number | null][] }[] = [
  { name: 'Ada Quill (demo)', department: 'Library Services', badge: 'QH-1001', keys: [['AB1', null]] },
  { name: 'Bo Linden (demo)', department: 'Library Services', badge: 'QH-1002', keys: [['AB2', null], ['AB5', -3]] },
  { name: 'Cass Moreno (demo)', department: 'Library Services', badge: 'QH-1003', keys: [['AB7', null]] },
  { name: 'Dev Okafor (demo)', department: 'Facilities', badge: 'QH-2001', keys: [['A', null]] },
  { name: 'Eve Sandoval (demo)', department: 'Facilities', badge: 'QH-2002', keys: [['AB', null], ['AD1', null]] },
  { name: 'Fin Hart (demo)', department: 'Facilities', badge: 'QH-2003', status: 'leaving', keys: [['AD2', null], ['AB3', null]] },
  { name: 'Gia Torres (demo)', department: 'Aster Hall Labs', badge: 'QH-3001', keys: [['AA7', 30]] },
  { name: 'Hal Whitby (demo)', department: 'Aster Hall Labs', badge: 'QH-3002', keys: [] },
];

export async function seedKeyControl(trx: Knex, sealer: Sealer, systemId: string, issuedBy: string): Promise<void> {
  const deptId = new Map<string, string>();
  for (const d of departments) {
    const [row] = await trx('departments').insert({ name: d.name }).returning('id');
    deptId.set(d.name, row.id);
    await trx('department_authorisers').insert(d.authorisers.map((a) => ({ department_id: row.id, ...a })));
  }
  const keyId = new Map((await trx('keys').where({ key_system_id: systemId }).select<{ id: string; symbol: string }[]>('id', 'symbol')).map((k) => [k.symbol, k.id]));
  const copies = new Map<string, number>();
  const day = 86400_000;
  let lostIssue: { id: string; keyId: string } | null = null;
  for (const [i, h] of holders.entries()) {
    const email = `${h.name.split(' ')[0]!.toLowerCase()}@demo.corewright.test`;
    const [holder] = await trx('key_holders').insert({ name: h.name, department_id: deptId.get(h.department), email, badge_id: h.badge, status: h.status ?? 'active' }).returning('id');
    for (const [symbol, due] of h.keys) {
      const copy = (copies.get(symbol) ?? 0) + 1;
      copies.set(symbol, copy);
      const issuedAt = new Date(Date.now() - (40 - i) * day);
      const [issue] = await trx('key_issues')
        .insert({ holder_id: holder.id, key_id: keyId.get(symbol), copy_number: copy, issued_by: issuedBy, issued_at: issuedAt, due_date: due === null ? null : new Date(Date.now() + due * day).toISOString().slice(0, 10), ack_name: h.name.replace(' (demo)', ''), ack_signature: null })
        .returning('id');
      if (symbol === 'AB7') lostIssue = { id: issue.id, keyId: keyId.get(symbol)! };
    }
  }
  // One open lost-key report: Cass's copy of AB7, its exposure computed through the engine.
  if (lostIssue) {
    await trx('key_issues').where({ id: lostIssue.id }).update({ status: 'lost' });
    const exposure = await keyExposureOf(trx, sealer, lostIssue.keyId);
    await trx('key_reports').insert({ issue_id: lostIssue.id, kind: 'lost', note: 'Reported lost on the way home (demo).', exposure: JSON.stringify(exposure), created_by: issuedBy });
  }
}

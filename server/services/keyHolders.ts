/** Departments (with who may authorise keys for them) and the people who hold keys. */
import type { Knex } from 'knex';
import type { Department, DepartmentInput, Holder, HolderInput, HolderQuery, HolderUpdate } from '../../shared/schemas/keyControl';
import { naturalCompare } from '../../shared/words';
import { badRequest, conflict, notFound } from '../errors';
import { likeText } from './likeText';

/** A query over rows that name a key holder (`column`), joined to the holder as `h` and their department as `d`. */
export function joinHolder<Q extends Knex.QueryBuilder>(q: Q, column: string): Q {
  return q.join('key_holders as h', 'h.id', column).join('departments as d', 'd.id', 'h.department_id') as Q;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export async function listDepartments(db: Knex, id?: string): Promise<Department[]> {
  const q = db('departments as d').select('d.id', 'd.name', db.raw('(select count(*) from key_holders h where h.department_id = d.id)::int as "holderCount"'));
  if (id) q.where('d.id', id);
  const rows = (await q) as { id: string; name: string; holderCount: number }[];
  const people = await db('department_authorisers').whereIn('department_id', rows.map((r) => r.id)).orderBy('name').select<{ id: string; department_id: string; name: string; email: string }[]>('id', 'department_id', 'name', 'email');
  return rows
    .map((r) => ({ ...r, authorisers: people.filter((p) => p.department_id === r.id).map(({ id: pid, name, email }) => ({ id: pid, name, email })) }))
    .sort((a, b) => naturalCompare(a.name, b.name));
}

export async function getDepartment(db: Knex, id: string): Promise<Department> {
  const [d] = await listDepartments(db, id);
  if (!d) throw notFound('That department');
  return d;
}

export async function createDepartment(db: Knex, input: DepartmentInput): Promise<string> {
  if (await db('departments').whereRaw('lower(name) = ?', [input.name.toLowerCase()]).first('id')) {
    throw conflict(`A department named "${input.name}" exists already.`, [{ field: 'name', message: 'already used' }]);
  }
  const emails = input.authorisers.map((a) => a.email);
  const twice = emails.find((e, i) => emails.indexOf(e) !== i);
  if (twice) throw badRequest(`${twice} is listed twice as an authoriser.`, [{ field: 'authorisers', message: `${twice} twice` }]);
  const [row] = await db('departments').insert({ name: input.name }).returning('id');
  if (input.authorisers.length) await db('department_authorisers').insert(input.authorisers.map((a) => ({ department_id: row.id, name: a.name, email: a.email })));
  return row.id as string;
}

/** A department by id, or by name (case-insensitive); a name not known yet adds the department. */
export async function departmentFor(db: Knex, ref: string): Promise<string> {
  if (UUID.test(ref)) {
    const d = await db('departments').where({ id: ref }).first('id');
    if (!d) throw badRequest('There is no department with that id.', [{ field: 'department', message: 'unknown department' }]);
    return d.id;
  }
  const found = await db('departments').whereRaw('lower(name) = ?', [ref.toLowerCase()]).first('id');
  if (found) return found.id;
  // Two holders of a new department added at once: the unique index keeps one row.
  await db.raw('INSERT INTO departments (name) VALUES (?) ON CONFLICT DO NOTHING', [ref]);
  return (await db('departments').whereRaw('lower(name) = ?', [ref.toLowerCase()]).first('id')).id;
}

export function holderQuery(db: Knex) {
  return db('key_holders as h')
    .join('departments as d', 'd.id', 'h.department_id')
    .select(
      'h.id',
      'h.name',
      'h.department_id as departmentId',
      'd.name as department',
      'h.email',
      'h.badge_id as badgeId',
      'h.status',
      'h.created_at as createdAt',
      db.raw(`(select count(*) from key_issues i where i.holder_id = h.id and i.status = 'out')::int as "keysOut"`),
    );
}

const iso = <T extends { createdAt: unknown }>(h: T): T => ({ ...h, createdAt: new Date(h.createdAt as string).toISOString() });

export async function listHolders(db: Knex, f: HolderQuery): Promise<Holder[]> {
  const q = holderQuery(db);
  if (f.q) {
    const like = `%${likeText(f.q)}%`;
    q.where((w) => {
      w.whereILike('h.name', like).orWhereILike('h.email', like).orWhereILike('h.badge_id', like).orWhereILike('d.name', like);
    });
  }
  if (f.departmentId) q.where('h.department_id', f.departmentId);
  if (f.status) q.where('h.status', f.status);
  const rows = (await q.limit(1000)) as Holder[];
  return rows.sort((a, b) => naturalCompare(a.name, b.name)).map(iso);
}

export async function getHolder(db: Knex, id: string): Promise<Holder> {
  const h = await holderQuery(db).where('h.id', id).first();
  if (!h) throw notFound('That key holder');
  return iso(h as Holder);
}

async function checkBadge(db: Knex, badgeId: string | null | undefined, except?: string): Promise<void> {
  if (!badgeId) return;
  const q = db('key_holders').whereRaw('lower(badge_id) = ?', [badgeId.toLowerCase()]);
  if (except) q.whereNot({ id: except });
  const taken = await q.first('name');
  if (taken) throw conflict(`Badge id ${badgeId} belongs to ${taken.name} already.`, [{ field: 'badgeId', message: 'already used' }]);
}

export async function createHolders(db: Knex, inputs: HolderInput[]): Promise<string[]> {
  const ids: string[] = [];
  for (const h of inputs) {
    await checkBadge(db, h.badgeId);
    const departmentId = await departmentFor(db, h.department);
    const [row] = await db('key_holders').insert({ name: h.name, department_id: departmentId, email: h.email ?? null, badge_id: h.badgeId ?? null }).returning('id');
    ids.push(row.id);
  }
  return ids;
}

export async function updateHolder(db: Knex, id: string, input: HolderUpdate): Promise<void> {
  const current = await db('key_holders').where({ id }).forUpdate().first('id');
  if (!current) throw notFound('That key holder');
  await checkBadge(db, input.badgeId, id);
  const row: Record<string, unknown> = { updated_at: db.fn.now() };
  if (input.name !== undefined) row.name = input.name;
  if (input.department !== undefined) row.department_id = await departmentFor(db, input.department);
  if (input.email !== undefined) row.email = input.email;
  if (input.badgeId !== undefined) row.badge_id = input.badgeId;
  if (input.status !== undefined) row.status = input.status;
  await db('key_holders').where({ id }).update(row);
}

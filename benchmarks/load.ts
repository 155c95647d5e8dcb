/**
 * Load benchmarks against a real server process on loopback (cases L1 and L2 of
 * ../shared/design/reliability.md). Bounded in count and time; sends traffic only to
 * 127.0.0.1. Run by scripts/bench.ts, which starts a throw-away Postgres and the server.
 */
import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import type { Packet } from '../shared/schemas/packet';
import { completionFor } from '../tests/api/factories';

export interface LoadFigures {
  [key: string]: unknown;
}

function percentile(sorted: number[], p: number): number {
  if (!sorted.length) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]!;
}

async function json(base: string, method: string, path: string, token?: string, body?: unknown) {
  const res = await fetch(base + path, { method, headers: { 'content-type': 'application/json', ...(token ? { authorization: `Bearer ${token}` } : {}) }, body: body === undefined ? undefined : JSON.stringify(body) });
  return { status: res.status, body: (await res.json().catch(() => null)) as never };
}

/** Signs in; a tablet names its device (packets go only to a session with one). */
export async function signIn(base: string, email: string, deviceId?: string): Promise<string> {
  const r = await json(base, 'POST', '/api/auth/sign-in', undefined, { email, password: 'corewright-demo', ...(deviceId ? { deviceId } : {}) });
  if (r.status !== 200) throw new Error(`sign-in failed: ${r.status}`);
  return (r.body as { accessToken: string }).accessToken;
}

/** One technician per device, each with a work order of its own 10 doors, as on a real campus. */
async function crews(base: string, db: Knex, count: number): Promise<{ token: string; deviceId: string; cores: { wo: string; core: Packet['cores'][number] }[] }[]> {
  const hash = (await db('users').where({ email: 'tech@demo.corewright.test' }).first('password_hash')).password_hash;
  const lead = await signIn(base, 'lead@demo.corewright.test');
  const system = await db('key_systems').first('id');
  const doors = await db('doors').whereNotNull('key_id').orderBy('label').select('id', 'key_id');
  const out = [];
  for (let i = 0; i < count; i++) {
    const email = `bench-tech-${i}@demo.corewright.test`;
    const [user] = await db('users').insert({ email, name: `Bench technician ${i}`, role: 'technician', password_hash: hash }).onConflict('email').merge().returning('id');
    const mine = Array.from({ length: 10 }, (_, j) => doors[(i * 10 + j) % doors.length]!);
    const wo = await json(base, 'POST', '/api/work-orders', lead, { title: `Load crew ${i}`, purpose: 'maintenance', keySystemId: system.id, assigneeId: user.id, doors: mine.map((d) => ({ doorId: d.id, keyId: d.key_id })) });
    if (wo.status !== 201) throw new Error(`work order for crew ${i}: ${wo.status}`);
    const deviceId = randomUUID();
    const token = await signIn(base, email, deviceId);
    const packet: Packet = ((await json(base, 'GET', `/api/work-orders/${(wo.body as { workOrder: { id: string } }).workOrder.id}/packet`, token)).body as { packet: Packet }).packet;
    out.push({ token, deviceId, cores: packet.cores.map((c) => ({ wo: packet.workOrder.id, core: c })) });
  }
  return out;
}

/**
 * L1: 20 devices sync batches of 50 completions at once for `seconds`. With several server
 * addresses (processes on one database), device i talks to bases[i % n], as a load balancer
 * pinning each client would spread them.
 */
export async function syncLoad(bases: string[], db: Knex, opts: { clients: number; batch: number; seconds: number }): Promise<LoadFigures> {
  const crewList = await crews(bases[0]!, db, opts.clients);
  const before = Number((await db('completions').count({ n: '*' }).first())!.n);
  const latencies: number[] = [];
  let sent = 0;
  let accepted = 0;
  let errors = 0;
  const until = Date.now() + opts.seconds * 1000;
  const maxRequests = 20_000;
  let requests = 0;
  await Promise.all(
    crewList.map(async ({ token, deviceId, cores }, i) => {
      while (Date.now() < until && requests < maxRequests) {
        requests++;
        const records = Array.from({ length: opts.batch }, (_, j) => {
          const pick = cores[(i * opts.batch + j + requests) % cores.length]!;
          return completionFor(pick.wo, pick.core);
        });
        const t0 = performance.now();
        const r = await json(bases[i % bases.length]!, 'POST', '/api/sync', token, { deviceId, records });
        latencies.push(performance.now() - t0);
        sent += records.length;
        if (r.status !== 200) errors++;
        else accepted += (r.body as { accepted: string[] }).accepted.length;
      }
    }),
  );
  const after = Number((await db('completions').count({ n: '*' }).first())!.n);
  latencies.sort((a, b) => a - b);
  return {
    processes: bases.length,
    clients: opts.clients,
    batchSize: opts.batch,
    seconds: opts.seconds,
    requests: latencies.length,
    recordsSent: sent,
    recordsAccepted: accepted,
    errorAnswers: errors,
    rowsAdded: after - before,
    lostOrDoubled: after - before - accepted,
    recordsPerSecond: Math.round(accepted / opts.seconds),
    p50Ms: Math.round(percentile(latencies, 50)),
    p95Ms: Math.round(percentile(latencies, 95)),
  };
}

/** L2: the completion log with `rows` rows: filtered pages, p95 over `samples` requests. */
export async function completionLog(base: string, db: Knex, opts: { rows: number; samples: number }): Promise<LoadFigures> {
  const token = await signIn(base, 'lead@demo.corewright.test');
  const have = Number((await db('completions').count({ n: '*' }).first())!.n);
  if (have < opts.rows) {
    // Rows made in SQL: spread over a year, over every core and technician, 1 in 12 failed.
    await db.raw(
      `with cs as (select x.core_id, x.work_order_id, c.tag, c.door_id, d.label, (row_number() over (order by c.tag)) - 1 as rn
                   from work_order_cores x join cores c on c.id = x.core_id left join doors d on d.id = c.door_id),
            ts as (select id, name, (row_number() over (order by email)) - 1 as rn from users where role in ('technician', 'supervisor')),
            n as (select (select count(*) from cs) as nc, (select count(*) from ts) as nt)
       insert into completions (id, core_id, work_order_id, technician_id, technician_name, core_tag, door_id, door_label, started_at, finished_at, result, attempt_count, failed_checks, attempts, payload_hash)
       select gen_random_uuid(), cs.core_id, cs.work_order_id, ts.id, ts.name, cs.tag, cs.door_id, cs.label,
              now() - (g % 365) * interval '1 day' - interval '20 minutes', now() - (g % 365) * interval '1 day' + (g % 600) * interval '1 second',
              case when g % 12 = 0 then 'failed' else 'passed' end, 1, case when g % 12 = 0 then 1 else 0 end, '[]'::jsonb, md5(g::text)
       from generate_series(1, ?) g cross join n
       join cs on cs.rn = g % n.nc
       join ts on ts.rn = g % n.nt`,
      [opts.rows - have],
    );
    await db.raw('analyze completions');
  }
  const total = Number((await db('completions').count({ n: '*' }).first())!.n);
  const wo = await db('work_orders').first('id');
  const tech = await db('users').where({ role: 'technician' }).first('id');
  const day = (n: number) => new Date(Date.now() - n * 86400_000).toISOString().slice(0, 10);
  const queries = [
    '/api/completions?page=1&pageSize=25',
    `/api/completions?result=failed&from=${day(90)}&to=${day(0)}&page=2&pageSize=50`,
    `/api/completions?workOrderId=${wo.id}&sort=technician&order=asc&pageSize=25`,
    `/api/completions?technicianId=${tech.id}&from=${day(30)}&sort=finishedAt&order=desc&page=3`,
    `/api/completions?sort=door&order=asc&page=40&pageSize=25`,
  ];
  const latencies: number[] = [];
  const perQuery = queries.map(() => [] as number[]);
  for (let i = 0; i < opts.samples; i++) {
    const t0 = performance.now();
    const r = await json(base, 'GET', queries[i % queries.length]!, token);
    const ms = performance.now() - t0;
    latencies.push(ms);
    perQuery[i % queries.length]!.push(ms);
    if (r.status !== 200) throw new Error(`completion log answered ${r.status}`);
  }
  latencies.sort((a, b) => a - b);
  const perQueryP95Ms = perQuery.map((l) => Math.round(percentile(l.sort((a, b) => a - b), 95) * 10) / 10);
  return { rows: total, samples: opts.samples, queries, perQueryP95Ms, p50Ms: Math.round(percentile(latencies, 50) * 10) / 10, p95Ms: Math.round(percentile(latencies, 95) * 10) / 10, targetP95Ms: 100, meetsTarget: percentile(latencies, 95) < 100 };
}

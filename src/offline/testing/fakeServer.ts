/**
 * A stand-in for the two endpoints the offline layer calls, run in-process as `fetch`:
 * POST /api/devices/escrow and POST /api/sync. It keeps one row per client id (the
 * server's idempotency rule) so tests can count what landed and what was sent twice.
 */
import type { SyncRecord } from '@shared/schemas/sync';

type Reply = { status: number; body: unknown };
export interface FakeServer {
  fetch: (input: RequestInfo | URL, init?: RequestInit) => Promise<Response>;
  rows: Map<string, SyncRecord>;
  /** Every record body the server received, in order; a client id twice means it was sent twice. */
  received: string[];
  syncRequests: SyncRecord[][];
  escrowRequests: number;
  /** Whole-request answers to give before behaving normally (a 500, a 401, ...). */
  queue: Reply[];
  /** Per-record refusal; return null to accept. */
  reject: (record: SyncRecord, index: number) => { code: string; message: string } | null;
  escrowReply: Reply | null;
  /** Answer refusals with clientId null, as for a record whose id could not be read. */
  anonymousRejections: boolean;
  revoked: boolean;
  offline: boolean;
}

/** The path a fetch asked for, as the offline layer passes it (a path string; a URL or Request also works). */
export const pathOf = (input: RequestInfo | URL): string => (typeof input === 'string' ? input : input instanceof URL ? input.href : input.url);
const json = (status: number, body: unknown) => new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });

function randomKey(): string {
  const bytes = globalThis.crypto.getRandomValues(new Uint8Array(32));
  return btoa(String.fromCharCode(...bytes));
}

export function createFakeServer(): FakeServer {
  const escrowKeys = new Map<string, string>();
  const server: FakeServer = {
    rows: new Map(),
    received: [],
    syncRequests: [],
    escrowRequests: 0,
    queue: [],
    reject: () => null,
    escrowReply: null,
    anonymousRejections: false,
    revoked: false,
    offline: false,
    // Answered at once, a throw becoming a rejection, as an async fetch does.
    fetch: (input, init) => new Promise((resolve) => resolve(answer(input, init))),
  };
  function answer(input: RequestInfo | URL, init?: RequestInit): Response {
    if (server.offline) throw new TypeError('fetch failed');
    const path = pathOf(input);
    const body = JSON.parse(typeof init?.body === 'string' ? init.body : '{}') as { deviceId: string; records?: SyncRecord[] };
    if (path === '/api/devices/escrow') {
      server.escrowRequests++;
      if (server.escrowReply) return json(server.escrowReply.status, server.escrowReply.body);
      if (!escrowKeys.has(body.deviceId)) escrowKeys.set(body.deviceId, randomKey());
      return json(200, { deviceId: body.deviceId, escrowKey: escrowKeys.get(body.deviceId) });
    }
    if (path !== '/api/sync') return json(404, { error: { code: 'not-found', message: 'Not found' } });
    const records = body.records ?? [];
    server.syncRequests.push(records);
    const queued = server.queue.shift();
    if (queued) return json(queued.status, queued.body);
    const res = { accepted: [] as string[], duplicates: [] as string[], rejected: [] as unknown[], ...(server.revoked ? { deviceRevoked: true } : {}) };
    // As the real server answers a revoked tablet: every record refused, and the flag set.
    if (server.revoked) {
      res.rejected = records.map((r, index) => ({ clientId: r.clientId, index, error: { code: 'device-revoked', message: 'This tablet was revoked by an administrator.' } }));
      return json(200, res);
    }
    records.forEach((record, index) => {
      server.received.push(record.clientId);
      const refusal = server.reject(record, index);
      if (refusal) res.rejected.push({ clientId: server.anonymousRejections ? null : record.clientId, index, error: refusal });
      else if (server.rows.has(record.clientId)) res.duplicates.push(record.clientId);
      else {
        server.rows.set(record.clientId, record);
        res.accepted.push(record.clientId);
      }
    });
    return json(200, res);
  }
  return server;
}

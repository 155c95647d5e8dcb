/**
 * The one place the client talks HTTP. Every answer is parsed with a shared zod schema;
 * every failure becomes an ApiError carrying the server's code and message, or
 * `network` when the server could not be reached at all.
 */
import type { z } from 'zod';
import type { ApiErrorBody, ErrorDetail } from '@shared/errors';

export class ApiError extends Error {
  constructor(
    readonly code: string,
    message: string,
    readonly status: number,
    readonly details: ErrorDetail[] = [],
  ) {
    super(message);
  }
  get isNetwork(): boolean {
    return this.code === 'network';
  }
}

export interface TokenSource {
  accessToken(): string | null;
  /** Gets a fresh access token after a 401; null when the session is over. */
  refresh(): Promise<string | null>;
}

let tokens: TokenSource | null = null;
export function useTokenSource(source: TokenSource | null): void {
  tokens = source;
}

interface Options<S extends z.ZodType> {
  body?: unknown;
  schema?: S;
  auth?: boolean;
  signal?: AbortSignal;
}

async function send(path: string, init: RequestInit, token: string | null): Promise<Response> {
  const headers: Record<string, string> = { ...(init.headers as Record<string, string> | undefined) };
  if (token) headers.Authorization = `Bearer ${token}`;
  try {
    return await fetch(path, { ...init, headers, cache: 'no-store' });
  } catch (err) {
    if ((err as Error).name === 'AbortError') throw err;
    throw new ApiError('network', 'The server cannot be reached; check the connection. Nothing was lost.', 0);
  }
}

/** fetch with the signed-in user's token, refreshed once on a 401: for uploads, downloads and JSON alike. */
export async function authorizedFetch(path: string, init: RequestInit = {}, auth = true): Promise<Response> {
  let res = await send(path, init, auth ? (tokens?.accessToken() ?? null) : null);
  if (res.status === 401 && auth && tokens) {
    const fresh = await tokens.refresh();
    if (fresh) res = await send(path, init, fresh);
  }
  return res;
}

/** What a user reads while the server (or its database) is away: work is kept, so waiting is safe. */
export const UNAVAILABLE_MESSAGE = 'The server is not available just now (its database is away or it is restarting). Nothing was lost; try again in a minute.';

/** The server's error shape as an ApiError; anything else (a proxy, the service worker) by its status. */
export async function errorOf(res: Response): Promise<ApiError> {
  try {
    const body = (await res.json()) as ApiErrorBody;
    if (body?.error?.code === 'unavailable') return new ApiError('unavailable', UNAVAILABLE_MESSAGE, res.status);
    if (body?.error?.code) return new ApiError(body.error.code, body.error.message, res.status, body.error.details ?? []);
  } catch {
    // not our JSON
  }
  if (res.status === 503) return new ApiError('unavailable', UNAVAILABLE_MESSAGE, res.status);
  return new ApiError(res.status >= 500 ? 'internal' : 'unknown', `The server answered ${res.status} ${res.statusText}.`, res.status);
}

export async function request<S extends z.ZodType>(method: string, path: string, opts: Options<S> = {}): Promise<z.infer<S>> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  if (opts.body !== undefined) headers['Content-Type'] = 'application/json';
  const init: RequestInit = { method, headers, body: opts.body === undefined ? null : JSON.stringify(opts.body), signal: opts.signal ?? null };
  const res = await authorizedFetch(path, init, opts.auth !== false);
  if (!res.ok) throw await errorOf(res);
  if (res.status === 204 || !opts.schema) return undefined as z.infer<S>;
  const json: unknown = await res.json();
  const parsed = opts.schema.safeParse(json);
  if (!parsed.success) throw new ApiError('bad-response', `The server's answer to ${method} ${path} was not understood.`, res.status);
  return parsed.data;
}

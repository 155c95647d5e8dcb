// Sign-in, tokens and sessions. Cases A1, A-2 and A6 of ../shared/design/reliability.md.
import { SignJWT, base64url } from 'jose';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { countRows, emailFor, startHarness, type Harness } from './harness';
import { ACCESS_TYP, AUDIENCE, ISSUER } from '../../server/services/tokens';
import { hashPassword } from '../../server/services/passwords';

let h: Harness;
beforeAll(async () => {
  h = await startHarness({ CW_SIGN_IN_ATTEMPTS: '5' });
});
afterAll(async () => h.close());

describe('POST /api/auth/sign-in', () => {
  test('with the right password: tokens and the user with its role', async () => {
    const res = await h.call('POST', '/api/auth/sign-in', { body: { email: 'Tech@Demo.Corewright.test ', password: 'corewright-demo' } });
    expect(res.status).toBe(200);
    expect(res.json.user).toMatchObject({ email: emailFor.technician, role: 'technician' });
    expect(res.json.accessToken.split('.')).toHaveLength(3);
    expect(res.json.refreshToken).toMatch(/^[0-9a-f-]{36}\.[A-Za-z0-9_-]{40,}$/);
    // ASVS 5 7.4: access token lifetime at most 15 minutes
    expect(res.json.expiresIn).toBeLessThanOrEqual(900);
    const me = await h.call('GET', '/api/auth/me', { token: res.json.accessToken });
    expect(me.status).toBe(200);
    expect(me.json.user.role).toBe('technician');
  });

  test('wrong password and unknown user get the same 401 message (ASVS 5 V6)', async () => {
    const wrong = await h.call('POST', '/api/auth/sign-in', { body: { email: emailFor.supervisor, password: 'not-it' } });
    const unknown = await h.call('POST', '/api/auth/sign-in', { body: { email: 'nobody@demo.corewright.test', password: 'not-it' } });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.json.error.code).toBe('unauthenticated');
    expect(wrong.json.error.message).toBe(unknown.json.error.message);
  });

  test('a missing or malformed field is a 400 that names the field, and no session is made', async () => {
    const before = await countRows(h.db, 'sessions');
    const res = await h.call('POST', '/api/auth/sign-in', { body: { email: 'not-an-email', password: '' } });
    expect(res.status).toBe(400);
    expect(res.json.error.code).toBe('validation');
    const fields = res.json.error.details.map((d: { field: string }) => d.field);
    expect(fields).toEqual(expect.arrayContaining(['email', 'password']));
    expect(res.json.error.details.find((d: { field: string }) => d.field === 'email').message).toMatch(/valid e-mail/);
    expect(await countRows(h.db, 'sessions')).toEqual(before);
  });

  test('an extra field such as role is refused (A5, mass assignment)', async () => {
    const res = await h.call('POST', '/api/auth/sign-in', { body: { email: emailFor.technician, password: 'corewright-demo', role: 'admin' } });
    expect(res.status).toBe(400);
    expect(res.json.error.message).toMatch(/remove "role"/);
  });

  test('a disabled account cannot sign in, and its open sessions end at once (case A-2)', async () => {
    const { accessToken } = await h.signIn(emailFor.admin);
    await h.db('users').where({ email: emailFor.admin }).update({ active: false });
    try {
      expect((await h.call('GET', '/api/users', { token: accessToken })).status).toBe(401);
      expect((await h.call('POST', '/api/auth/sign-in', { body: { email: emailFor.admin, password: 'corewright-demo' } })).status).toBe(401);
    } finally {
      await h.db('users').where({ email: emailFor.admin }).update({ active: true });
    }
  });
});

describe('repeated failed sign-ins (A6, express-rate-limit)', () => {
  test('the sixth failure in the window is a 429 with Retry-After', async () => {
    const email = 'limit-check@demo.corewright.test';
    await h.db('users').insert({ email, name: 'Rate limit check', role: 'technician', password_hash: await hashPassword('corewright-demo') });
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) statuses.push((await h.call('POST', '/api/auth/sign-in', { body: { email, password: `wrong-${i}` } })).status);
    expect(statuses).toEqual([401, 401, 401, 401, 401, 429]);
    const locked = await h.call('POST', '/api/auth/sign-in', { body: { email, password: 'corewright-demo' } });
    expect(locked.status).toBe(429);
    expect(Number(locked.headers.get('retry-after'))).toBeGreaterThan(0);
    expect(locked.json.error).toMatchObject({ code: 'rate-limited' });
    expect(await h.db('audit_events').where({ action: 'auth.sign-in.failed', actor_email: email }).count({ n: '*' }).first()).toEqual({ n: 5 });
  });
});

describe('access tokens (A1: RFC 8725, jose)', () => {
  const now = () => Math.floor(Date.now() / 1000);
  async function forge(opts: { alg?: string; typ?: string; iss?: string; aud?: string; exp?: number; nbf?: number; secret?: Uint8Array } = {}) {
    const good = await h.signIn(emailFor.technician);
    const [, payloadB64] = good.accessToken.split('.');
    const claims = JSON.parse(new TextDecoder().decode(base64url.decode(payloadB64!)));
    return new SignJWT({ sid: claims.sid, role: claims.role })
      .setProtectedHeader({ alg: opts.alg ?? 'HS256', typ: opts.typ ?? ACCESS_TYP })
      .setIssuer(opts.iss ?? ISSUER)
      .setAudience(opts.aud ?? AUDIENCE)
      .setSubject(claims.sub)
      .setIssuedAt(now() - 60)
      .setNotBefore(opts.nbf ?? now() - 60)
      .setExpirationTime(opts.exp ?? now() + 600)
      .sign(opts.secret ?? h.config.jwtSecret);
  }

  test('a token forged the same way as ours is accepted (the control case)', async () => {
    expect((await h.call('GET', '/api/auth/me', { token: await forge() })).status).toBe(200);
  });

  test.each([
    ['wrong issuer', { iss: 'someone-else' }],
    ['wrong audience', { aud: 'another-api' }],
    ['wrong typ', { typ: 'JWT' }],
    ['expired', { exp: Math.floor(Date.now() / 1000) - 5 }],
    ['not yet valid (nbf ahead)', { nbf: Math.floor(Date.now() / 1000) + 3600 }],
    ['wrong algorithm (HS512)', { alg: 'HS512' }],
    ['signed with another secret', { secret: new Uint8Array(32).fill(7) }],
  ])('%s: 401', async (_name, opts) => {
    const res = await h.call('GET', '/api/auth/me', { token: await forge(opts) });
    expect(res.status).toBe(401);
    expect(res.json.error.code).toBe('unauthenticated');
  });

  test('a tampered signature and alg "none" are 401', async () => {
    const good = (await h.signIn(emailFor.technician)).accessToken;
    const [head, body, sig] = good.split('.');
    const flipped = `${head}.${body}.${sig!.slice(0, -2)}${sig!.endsWith('AA') ? 'BB' : 'AA'}`;
    expect((await h.call('GET', '/api/auth/me', { token: flipped })).status).toBe(401);
    const none = `${base64url.encode(JSON.stringify({ alg: 'none', typ: ACCESS_TYP }))}.${body}.`;
    expect((await h.call('GET', '/api/auth/me', { token: none })).status).toBe(401);
    // a payload raised to admin keeps the old signature: rejected
    const claims = JSON.parse(new TextDecoder().decode(base64url.decode(body!)));
    const raised = `${head}.${base64url.encode(JSON.stringify({ ...claims, role: 'admin' }))}.${sig}`;
    expect((await h.call('GET', '/api/users', { token: raised })).status).toBe(401);
  });

  test('no token at all: 401 on a protected route', async () => {
    const res = await h.call('GET', '/api/users');
    expect(res.status).toBe(401);
    expect(res.json.error.message).toMatch(/no access token/);
  });
});

describe('refresh and sign-out (case A-2)', () => {
  test('refresh rotates the refresh token; the old one, presented again after its grace window, ends the session', async () => {
    const first = await h.signIn(emailFor.supervisor);
    const r1 = await h.call('POST', '/api/auth/refresh', { body: { refreshToken: first.refreshToken } });
    expect(r1.status).toBe(200);
    expect(r1.json.refreshToken).not.toBe(first.refreshToken);
    // The grace window for parallel tabs (T8) is over:
    await h.db('sessions').where({ id: first.refreshToken.split('.')[0] }).update({ previous_until: new Date(Date.now() - 1000) });
    const reuse = await h.call('POST', '/api/auth/refresh', { body: { refreshToken: first.refreshToken } });
    expect(reuse.status).toBe(401);
    // the theft rule: the rotated token dies with the session, and so does its access token
    expect((await h.call('POST', '/api/auth/refresh', { body: { refreshToken: r1.json.refreshToken } })).status).toBe(401);
    expect((await h.call('GET', '/api/auth/me', { token: r1.json.accessToken })).status).toBe(401);
  });

  test('sign-out ends the access token at once', async () => {
    const s = await h.signIn(emailFor.technician);
    expect((await h.call('POST', '/api/auth/sign-out', { token: s.accessToken })).status).toBe(204);
    expect((await h.call('GET', '/api/auth/me', { token: s.accessToken })).status).toBe(401);
    expect((await h.call('POST', '/api/auth/refresh', { body: { refreshToken: s.refreshToken } })).status).toBe(401);
  });
});

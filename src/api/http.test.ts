import { describe, expect, test } from 'vitest';
import { errorOf, UNAVAILABLE_MESSAGE } from './http';

describe('errorOf: what the user reads when the server is away (T10)', () => {
  test("the server's 503 unavailable and a proxy's bare 503 both read as unavailable, with words that say nothing was lost (RFC 9110 15.6.4)", async () => {
    const ours = await errorOf(new Response(JSON.stringify({ error: { code: 'unavailable', message: 'The server cannot reach its database just now.' } }), { status: 503, headers: { 'Retry-After': '5' } }));
    expect(ours).toMatchObject({ code: 'unavailable', status: 503, message: UNAVAILABLE_MESSAGE });
    const proxy = await errorOf(new Response('<html>Service Unavailable</html>', { status: 503, statusText: 'Service Unavailable' }));
    expect(proxy).toMatchObject({ code: 'unavailable', status: 503 });
    expect(UNAVAILABLE_MESSAGE).toMatch(/Nothing was lost/);
  });

  test('other errors keep their own code and message (control)', async () => {
    const bad = await errorOf(new Response(JSON.stringify({ error: { code: 'validation', message: 'q: remove the control character U+0000' } }), { status: 400 }));
    expect(bad).toMatchObject({ code: 'validation', message: 'q: remove the control character U+0000' });
    expect(await errorOf(new Response('oops', { status: 500, statusText: 'Internal Server Error' }))).toMatchObject({ code: 'internal' });
  });
});

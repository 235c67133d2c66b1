import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import jwt from 'jsonwebtoken';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD } from '../../seeds/demo-world';

let stack: Awaited<ReturnType<typeof startTestStack>>;
beforeAll(async () => {
  stack = await startTestStack({ seed: true, env: { BW_ALLOWED_ORIGINS: 'https://ops.example.org' } });
});
afterAll(async () => {
  await stack?.stop();
});

describe('sign-in, session cookie, /api/me, sign-out', () => {
  it('signs in with the right password, sets an httpOnly SameSite=Strict cookie and answers /api/me', async () => {
    const agent = request.agent(stack.http);
    const res = await agent.post('/api/auth/sign-in').send({ email: 'engineer@saltmarsh.example', password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ email: 'engineer@saltmarsh.example', role: 'engineer', ownerId: null, name: 'Ravi Lindqvist' });
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toMatch(/bw_session=/);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Strict/);
    const me = await agent.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body.role).toBe('engineer');
    expect(await agent.post('/api/auth/sign-out').then((r) => r.status)).toBe(204);
    expect(await agent.get('/api/me').then((r) => r.status)).toBe(401);
  });

  it('answers wrong password and unknown account with the same generic 401', async () => {
    const a = await request(stack.http).post('/api/auth/sign-in').send({ email: 'tech1@saltmarsh.example', password: 'wrong-password' });
    const b = await request(stack.http).post('/api/auth/sign-in').send({ email: 'nobody@saltmarsh.example', password: 'wrong-password' });
    expect(a.status).toBe(401);
    expect(b.status).toBe(401);
    expect(a.body.error.code).toBe('invalid_credentials');
    expect(a.body.error.message).toBe(b.body.error.message);
  });

  it('refuses a tampered or missing token with 401', async () => {
    expect((await request(stack.http).get('/api/me')).status).toBe(401);
    const forged = jwt.sign({ sub: '1' }, 'not-the-server-secret-not-the-server-secret');
    expect((await request(stack.http).get('/api/me').set('Cookie', `bw_session=${forged}`)).status).toBe(401);
    expect((await request(stack.http).get('/api/sites').set('Authorization', 'Bearer garbage')).status).toBe(401);
  });

  it('rejects malformed JSON and unknown fields with 400 naming the field', async () => {
    const bad = await request(stack.http).post('/api/auth/sign-in').set('Content-Type', 'application/json').send('{"email":');
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('malformed_json');
    const extra = await request(stack.http).post('/api/auth/sign-in').send({ email: 'a@b.c', password: 'x', remember: true });
    expect(extra.status).toBe(400);
    expect(extra.body.error.fields).toEqual({ remember: 'Unknown field.' });
  });

  it('reports only ok or degraded for database and broker in /api/health without a session', async () => {
    const res = await request(stack.http).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok', database: { ok: true }, broker: { ok: true } });
  });

  it('signs out a disabled user at once', async () => {
    const admin = request.agent(stack.http);
    await admin.post('/api/auth/sign-in').send({ email: 'admin@saltmarsh.example', password: DEMO_PASSWORD }).expect(200);
    const crew = request.agent(stack.http);
    await crew.post('/api/auth/sign-in').send({ email: 'crew1@saltmarsh.example', password: DEMO_PASSWORD }).expect(200);
    const users = (await admin.get('/api/users')).body as { id: number; email: string }[];
    const id = users.find((u) => u.email === 'crew1@saltmarsh.example')!.id;
    await admin.patch(`/api/users/${id}`).send({ disabled: true }).expect(200);
    expect((await crew.get('/api/me')).status).toBe(401);
    expect((await crew.post('/api/auth/sign-in').send({ email: 'crew1@saltmarsh.example', password: DEMO_PASSWORD })).status).toBe(401);
    await admin.patch(`/api/users/${id}`).send({ disabled: false }).expect(200);
  });
});

describe('requests from pages on other origins', () => {
  const host = () => new URL(stack.url).host;
  const signInFrom = (headers: Record<string, string>) =>
    request(stack.http).post('/api/auth/sign-in').set(headers).send({ email: 'tech1@saltmarsh.example', password: DEMO_PASSWORD });

  it('refuses a state-changing request from another origin with 403 in the one error shape', async () => {
    for (const origin of ['http://evil.example', 'null', `https://${host()}.evil.example`, 'http://127.0.0.1:1']) {
      const res = await signInFrom({ Origin: origin });
      expect(res.status, origin).toBe(403);
      expect(res.body, origin).toEqual({ error: { code: 'foreign_origin', message: expect.stringContaining('another site') } });
      expect(res.headers['set-cookie'], origin).toBeUndefined();
    }
    const admin = request.agent(stack.http);
    await admin.post('/api/auth/sign-in').send({ email: 'admin@saltmarsh.example', password: DEMO_PASSWORD }).expect(200);
    const id = (await stack.db('users').where({ email: 'tech2@saltmarsh.example' }).first()).id as number;
    expect((await admin.patch(`/api/users/${id}`).set('Origin', 'http://evil.example').send({ disabled: true })).status).toBe(403);
    expect((await admin.post('/api/auth/sign-out').set('Origin', 'http://evil.example')).status).toBe(403);
    expect((await stack.db('users').where({ id }).first()).disabled).toBeFalsy();
    expect((await admin.get('/api/me')).status).toBe(200);
  });

  it('refuses a request the browser marks as cross-site even without an Origin header', async () => {
    expect((await signInFrom({ 'Sec-Fetch-Site': 'cross-site' })).status).toBe(403);
  });

  it('lets through its own origin, an origin on BW_ALLOWED_ORIGINS, scripts without Origin, and reads from anywhere', async () => {
    expect((await signInFrom({ Origin: `http://${host()}` })).status).toBe(200);
    expect((await signInFrom({ Origin: 'https://ops.example.org' })).status).toBe(200);
    expect((await signInFrom({ 'Sec-Fetch-Site': 'same-origin' })).status).toBe(200);
    expect((await signInFrom({})).status).toBe(200);
    expect((await request(stack.http).get('/api/health').set('Origin', 'http://evil.example')).status).toBe(200);
  });
});

describe('security headers', () => {
  it("sends a content security policy that allows only the server's own scripts, and the usual hardening headers", async () => {
    const res = await request(stack.http).get('/api/health');
    const csp = String(res.headers['content-security-policy']);
    const directives = Object.fromEntries(
      csp
        .split(';')
        .map((d) => d.trim().split(/\s+/))
        .map(([k, ...v]) => [k, v.join(' ')]),
    );
    expect(directives).toMatchObject({
      'default-src': "'self'",
      'script-src': "'self'",
      'script-src-attr': "'none'",
      'object-src': "'none'",
      'base-uri': "'self'",
      'frame-ancestors': "'none'",
      'form-action': "'self'",
      'connect-src': "'self'",
    });
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-frame-options']).toBe('DENY');
    expect(res.headers['referrer-policy']).toBe('no-referrer');
    expect(res.headers['cross-origin-opener-policy']).toBe('same-origin');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import jwt from 'jsonwebtoken';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD } from '../../seeds/demo-world';

let stack: Awaited<ReturnType<typeof startTestStack>>;
beforeAll(async () => { stack = await startTestStack({ seed: true }); });
afterAll(async () => { await stack?.stop(); });

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

  it('answers 429 after 10 failed sign-ins within a minute for one account', async () => {
    const email = 'crew2@saltmarsh.example';
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++) {
      statuses.push((await request(stack.http).post('/api/auth/sign-in').set('X-Forwarded-For', `10.9.0.${i}`).send({ email, password: 'nope-nope-nope' })).status);
    }
    expect(statuses.slice(0, 10)).toEqual(Array(10).fill(401));
    expect(statuses[10]).toBe(429);
    // Even the right password is refused while the account is blocked.
    const ok = await request(stack.http).post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD });
    expect(ok.status).toBe(429);
    expect(ok.body.error.code).toBe('too_many_attempts');
  });

  it('rejects malformed JSON and unknown fields with 400 naming the field', async () => {
    const bad = await request(stack.http).post('/api/auth/sign-in').set('Content-Type', 'application/json').send('{"email":');
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('malformed_json');
    const extra = await request(stack.http).post('/api/auth/sign-in').send({ email: 'a@b.c', password: 'x', remember: true });
    expect(extra.status).toBe(400);
    expect(extra.body.error.fields).toEqual({ remember: 'Unknown field.' });
  });

  it('reports database and broker in /api/health without a session', async () => {
    const res = await request(stack.http).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'ok', database: { ok: true }, broker: { ok: true, port: stack.broker.port } });
    expect(res.body.version).toMatch(/^\d+\.\d+\.\d+/);
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

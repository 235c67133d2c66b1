import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import request from 'supertest';
import bcrypt from 'bcryptjs';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD } from '../../seeds/demo-world';

// Two servers: one as shipped (no proxy trusted), one told that a proxy on loopback sets X-Forwarded-For/-Proto.
let plain: Awaited<ReturnType<typeof startTestStack>>;
let proxied: Awaited<ReturnType<typeof startTestStack>>;
beforeAll(async () => {
  [plain, proxied] = await Promise.all([
    startTestStack({ seed: true }),
    startTestStack({ seed: true, env: { BW_TRUST_PROXY: 'loopback' } }),
  ]);
});
afterAll(async () => {
  await Promise.all([plain?.stop(), proxied?.stop()]);
});

/** A fresh client address for each request through the trusted proxy, so only the account limit applies. */
let n = 0;
const nextAddress = () => {
  n++;
  return `10.${Math.floor(n / 250)}.${n % 250}.7`;
};
const signIn = (stack: typeof plain, email: string, password: string, headers: Record<string, string> = {}) =>
  request(stack.http).post('/api/auth/sign-in').set(headers).send({ email, password });

describe('session cookie over HTTPS', () => {
  it('marks the cookie Secure when the request came over HTTPS through the configured proxy', async () => {
    const secure = await signIn(proxied, 'tech1@saltmarsh.example', DEMO_PASSWORD, {
      'X-Forwarded-For': nextAddress(),
      'X-Forwarded-Proto': 'https',
    });
    expect(secure.status).toBe(200);
    expect(String(secure.headers['set-cookie'])).toMatch(/;\s*Secure/i);
    const clear = await signIn(proxied, 'tech1@saltmarsh.example', DEMO_PASSWORD, { 'X-Forwarded-For': nextAddress() });
    expect(String(clear.headers['set-cookie'])).not.toMatch(/Secure/i);
  });

  it('does not believe X-Forwarded-Proto when no proxy is configured', async () => {
    const res = await signIn(plain, 'tech1@saltmarsh.example', DEMO_PASSWORD, { 'X-Forwarded-Proto': 'https' });
    expect(res.status).toBe(200);
    expect(String(res.headers['set-cookie'])).not.toMatch(/Secure/i);
  });
});

describe('sign-in limit', () => {
  it('answers 429 after 10 failed sign-ins within a minute for one account, even for the right password', async () => {
    const email = 'crew2@saltmarsh.example';
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++)
      statuses.push((await signIn(proxied, email, 'nope-nope-nope', { 'X-Forwarded-For': nextAddress() })).status);
    expect(statuses).toEqual([...Array(10).fill(401), 429]);
    const ok = await signIn(proxied, email, DEMO_PASSWORD, { 'X-Forwarded-For': nextAddress() });
    expect(ok.status).toBe(429);
    expect(ok.body.error.code).toBe('too_many_attempts');
  });

  it('counts the failures of one account under every spelling the database matches to it', async () => {
    const spellings = [
      'tech2@saltmarsh.example',
      'TECH2@saltmarsh.example',
      'tech2@saltmarsh.example ',
      'tech2@saltmarsh.example   ',
      'téch2@saltmarsh.example',
      'Tech2@Saltmarsh.Example',
      'tèch2@saltmarsh.example ',
      'tech2@sältmarsh.example',
      'TÉCH2@SALTMARSH.EXAMPLE',
      'tech2@saltmarsh.examplé',
    ];
    for (const email of spellings)
      expect((await signIn(proxied, email, 'wrong-password', { 'X-Forwarded-For': nextAddress() })).status, email).toBe(401);
    expect((await signIn(proxied, 'tech2@saltmarsh.example', DEMO_PASSWORD, { 'X-Forwarded-For': nextAddress() })).status).toBe(429);
  });

  it('counts each attempt before checking the password, so a parallel burst gets no more than 10 tries', async () => {
    const burst = await Promise.all(
      Array.from({ length: 30 }, (_, i) =>
        signIn(proxied, 'engineer@saltmarsh.example', `guess-${i}`, { 'X-Forwarded-For': nextAddress() }),
      ),
    );
    const statuses = burst.map((r) => r.status);
    expect(statuses.filter((s) => s === 401)).toHaveLength(10);
    expect(statuses.filter((s) => s === 429)).toHaveLength(20);
  });

  it('does not count successful sign-ins', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 15; i++)
      statuses.push((await signIn(proxied, 'owner@quillmoor.example', DEMO_PASSWORD, { 'X-Forwarded-For': nextAddress() })).status);
    expect(statuses).toEqual(Array(15).fill(200));
  });

  it('limits one client address across accounts and ignores X-Forwarded-For unless a proxy is configured', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++)
      statuses.push((await signIn(plain, `nobody${i}@saltmarsh.example`, 'wrong-password', { 'X-Forwarded-For': `10.200.0.${i}` })).status);
    expect(statuses).toEqual([...Array(10).fill(401), 429]);
  });
});

describe('account discovery', () => {
  it('checks a password for an unknown or disabled account as long as for a real one (one bcrypt compare at the same cost)', async () => {
    const compare = vi.spyOn(bcrypt, 'compare');
    try {
      const real = await proxied.db('users').where({ email: 'admin@saltmarsh.example' }).first();
      const rounds = bcrypt.getRounds(real.password_hash as string);
      await proxied.db('users').where({ email: 'crew1@saltmarsh.example' }).update({ disabled: true });
      for (const email of ['nobody-here@saltmarsh.example', 'crew1@saltmarsh.example', 'admin@saltmarsh.example']) {
        compare.mockClear();
        const res = await signIn(proxied, email, 'wrong-password', { 'X-Forwarded-For': nextAddress() });
        expect(res.status, email).toBe(401);
        expect(compare, email).toHaveBeenCalledTimes(1);
        expect(bcrypt.getRounds(compare.mock.calls[0]![1] as string), email).toBe(rounds);
      }
    } finally {
      compare.mockRestore();
      await proxied.db('users').where({ email: 'crew1@saltmarsh.example' }).update({ disabled: false });
    }
  });
});

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD } from '../../seeds/demo-world';

let stack: Awaited<ReturnType<typeof startTestStack>>;
beforeAll(async () => {
  stack = await startTestStack({ seed: true });
});
afterAll(async () => {
  await stack?.stop();
});

async function signIn(email: string, password = DEMO_PASSWORD) {
  const agent = request.agent(stack.http);
  const res = await agent.post('/api/auth/sign-in').send({ email, password }).expect(200);
  const token = String(res.headers['set-cookie']).split(';')[0]!.slice('bw_session='.length);
  return { agent, token };
}

const meAs = (token: string) => request(stack.http).get('/api/me').set('Authorization', `Bearer ${token}`);
const userId = async (email: string) => (await stack.db('users').where({ email }).first()).id as number;

describe('sessions end when they should', () => {
  it('refuses the token of a signed-out session, also as a bearer token', async () => {
    const { agent, token } = await signIn('engineer@saltmarsh.example');
    expect((await meAs(token)).status).toBe(200);
    await agent.post('/api/auth/sign-out').expect(204);
    expect((await meAs(token)).status).toBe(401);
    expect((await agent.get('/api/me')).status).toBe(401);
  });

  it('signs out with a bearer token too, and signing out one device leaves the others signed in', async () => {
    const a = await signIn('tech1@saltmarsh.example');
    const b = await signIn('tech1@saltmarsh.example');
    await request(stack.http).post('/api/auth/sign-out').set('Authorization', `Bearer ${a.token}`).expect(204);
    expect((await meAs(a.token)).status).toBe(401);
    expect((await meAs(b.token)).status).toBe(200);
    const audit = await stack.db('audit_log').where({ action: 'sign-out', user_id: await userId('tech1@saltmarsh.example') });
    expect(audit).toHaveLength(1);
  });

  it('ends every session of a user who is disabled, given another role, moved to another owner or given a new password', async () => {
    const admin = (await signIn('admin@saltmarsh.example')).agent;
    const owners = (await stack.db('owners').orderBy('id')) as { id: number }[];
    const cases: [string, (id: number) => Promise<unknown>][] = [
      ['crew1@saltmarsh.example', (id) => admin.patch(`/api/users/${id}`).send({ disabled: true }).expect(200)],
      ['tech2@saltmarsh.example', (id) => admin.patch(`/api/users/${id}`).send({ role: 'engineer' }).expect(200)],
      [
        'owner@quillmoor.example',
        (id) =>
          admin
            .patch(`/api/users/${id}`)
            .send({ ownerId: owners.at(-1)!.id })
            .expect(200),
      ],
      ['crew2@saltmarsh.example', (id) => admin.post(`/api/users/${id}/password`).send({ password: 'a-brand-new-password' }).expect(204)],
    ];
    for (const [email, change] of cases) {
      const first = await signIn(email);
      const second = await signIn(email);
      await change(await userId(email));
      expect([(await meAs(first.token)).status, (await meAs(second.token)).status], email).toEqual([401, 401]);
    }
    // A re-enabled user signs in afresh; the old sessions stay ended.
    const crew1 = await userId('crew1@saltmarsh.example');
    await admin.patch(`/api/users/${crew1}`).send({ disabled: false }).expect(200);
    expect((await signIn('crew1@saltmarsh.example')).token).toBeTruthy();
  });

  it('keeps the sessions of a user whose name alone changed', async () => {
    const admin = (await signIn('admin@saltmarsh.example')).agent;
    const { token } = await signIn('owner@fenwicklane.example');
    await admin
      .patch(`/api/users/${await userId('owner@fenwicklane.example')}`)
      .send({ name: 'Jonah W. Whitcombe' })
      .expect(200);
    const me = await meAs(token);
    expect(me.status).toBe(200);
    expect(me.body.name).toBe('Jonah W. Whitcombe');
  });

  it('refuses a session past its end even while the token itself is still valid', async () => {
    const { token } = await signIn('engineer@saltmarsh.example');
    expect((await meAs(token)).status).toBe(200);
    await stack.testDb
      .db('sessions')
      .where({ user_id: await userId('engineer@saltmarsh.example') })
      .update({ expires_at: new Date(Date.now() - 1000) });
    expect((await meAs(token)).status).toBe(401);
  });
});

describe("changing one's own password", () => {
  it('needs the current password: a wrong one is a 400 naming the field and is audited', async () => {
    const { agent } = await signIn('tech1@saltmarsh.example');
    const res = await agent.post('/api/me/password').send({ currentPassword: 'not-the-password', newPassword: 'another-long-password' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ currentPassword: 'That is not your current password.' });
    expect(
      await stack.db('audit_log').where({ action: 'password-change-failed', user_id: await userId('tech1@saltmarsh.example') }),
    ).toHaveLength(1);
    const missing = await agent.post('/api/me/password').send({ newPassword: 'short' });
    expect(missing.status).toBe(400);
    expect(Object.keys(missing.body.error.fields).sort()).toEqual(['currentPassword', 'newPassword']);
    expect(
      (await request(stack.http).post('/api/me/password').send({ currentPassword: DEMO_PASSWORD, newPassword: 'another-long-password' }))
        .status,
    ).toBe(401);
  });

  it('sets the new password for every role, keeps this session, ends the others and is audited', async () => {
    for (const email of ['owner@fenwicklane.example', 'engineer@saltmarsh.example']) {
      const here = await signIn(email);
      const elsewhere = await signIn(email);
      await here.agent.post('/api/me/password').send({ currentPassword: DEMO_PASSWORD, newPassword: 'my own new password 1' }).expect(204);
      expect((await here.agent.get('/api/me')).status, email).toBe(200);
      expect((await meAs(elsewhere.token)).status, email).toBe(401);
      await request(stack.http).post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }).expect(401);
      await signIn(email, 'my own new password 1');
      expect(await stack.db('audit_log').where({ action: 'password-change', user_id: await userId(email) })).toHaveLength(1);
    }
  });

  it('refuses a new password equal to the current one', async () => {
    const { agent } = await signIn('admin@saltmarsh.example');
    const res = await agent.post('/api/me/password').send({ currentPassword: DEMO_PASSWORD, newPassword: DEMO_PASSWORD });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ newPassword: 'Choose a password different from the current one.' });
  });

  it('limits wrong current passwords like sign-in: 429 after 10 in a minute, also for the right one', async () => {
    const { agent } = await signIn('tech2@saltmarsh.example');
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++)
      statuses.push(
        (await agent.post('/api/me/password').send({ currentPassword: `wrong-${i}`, newPassword: 'another-long-password' })).status,
      );
    expect(statuses).toEqual([...Array(10).fill(400), 429]);
    const blocked = await agent.post('/api/me/password').send({ currentPassword: DEMO_PASSWORD, newPassword: 'another-long-password' });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('too_many_attempts');
  });
});

describe('passwords longer than bcrypt reads', () => {
  // 'é' is 2 bytes in UTF-8: 37 of them are 37 characters but 74 bytes, past bcrypt's 72.
  const long = 'é'.repeat(37);
  const fits = 'é'.repeat(36);

  it('are refused with a field error wherever a password is set', async () => {
    const admin = (await signIn('admin@saltmarsh.example')).agent;
    const create = await admin
      .post('/api/users')
      .send({ email: 'long@saltmarsh.example', name: 'Long Password', role: 'engineer', password: long });
    expect(create.status).toBe(400);
    expect(create.body.error.fields).toEqual({
      password: 'At most 72 bytes (UTF-8): fewer characters when they are accented or not Latin.',
    });
    const reset = await admin.post(`/api/users/${await userId('engineer@saltmarsh.example')}/password`).send({ password: long });
    expect(reset.status).toBe(400);
    expect(Object.keys(reset.body.error.fields)).toEqual(['password']);
    const own = await admin.post('/api/me/password').send({ currentPassword: DEMO_PASSWORD, newPassword: long });
    expect(own.status).toBe(400);
    expect(Object.keys(own.body.error.fields)).toEqual(['newPassword']);
  });

  it('up to 72 bytes work, and every byte of them counts', async () => {
    const admin = (await signIn('admin@saltmarsh.example')).agent;
    await admin
      .post('/api/users')
      .send({ email: 'fits@saltmarsh.example', name: 'Fits Exactly', role: 'engineer', password: fits })
      .expect(201);
    await signIn('fits@saltmarsh.example', fits);
    await request(stack.http)
      .post('/api/auth/sign-in')
      .send({ email: 'fits@saltmarsh.example', password: `${'é'.repeat(35)}e` })
      .expect(401);
  });
});

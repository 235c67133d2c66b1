import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { request as httpRequest } from 'node:http';
import request from 'supertest';
import WebSocket from 'ws';
import { startTestStack } from '../helpers/test-stack';
import { waitFor } from '../helpers/fake-unit';
import { DEMO_PASSWORD } from '../../seeds/demo-world';
import type { LiveServerMessage } from '../../shared/contracts/live';

let stack: Awaited<ReturnType<typeof startTestStack>>;
beforeAll(async () => {
  stack = await startTestStack({ seed: true, stack: { sessionRecheckMs: 200 } });
});
afterAll(async () => {
  await stack?.stop();
});

const host = () => new URL(stack.url).host;

async function signIn(email: string) {
  const agent = request.agent(stack.http);
  const res = await agent.post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }).expect(200);
  const cookie = String(res.headers['set-cookie']).split(';')[0]!;
  return { agent, cookie, token: cookie.slice('bw_session='.length) };
}

interface OpenSocket {
  ws: WebSocket;
  messages: LiveServerMessage[];
  closed: { code: number; reason: string } | null;
}

function openSocket(cookie: string, headers: Record<string, string> = {}): Promise<OpenSocket> {
  const ws = new WebSocket(`${stack.url.replace('http', 'ws')}/ws`, { headers: { Cookie: cookie, ...headers } });
  const s: OpenSocket = { ws, messages: [], closed: null };
  ws.on('message', (d) => s.messages.push(JSON.parse(String(d))));
  ws.on('close', (code, reason) => {
    s.closed = { code, reason: String(reason) };
  });
  return new Promise((res, rej) => {
    ws.once('open', () => res(s));
    ws.once('unexpected-response', (_req, r) => rej(new Error(`HTTP ${r.statusCode}`)));
    ws.once('error', rej);
  });
}

/** A hand-made upgrade request, so headers a WebSocket client would never send can be tried. Resolves with the status. */
function rawUpgrade(headers: Record<string, string>): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = httpRequest(`${stack.url}/ws`, {
      headers: {
        Connection: 'Upgrade',
        Upgrade: 'websocket',
        'Sec-WebSocket-Version': '13',
        'Sec-WebSocket-Key': 'dGhlIHNhbXBsZSBub25jZQ==',
        ...headers,
      },
    });
    req.on('response', (res) => {
      res.resume();
      resolve(res.statusCode ?? 0);
    });
    req.on('upgrade', (_res, socket) => {
      socket.destroy();
      resolve(101);
    });
    req.on('error', reject);
    req.end();
  });
}

async function userId(email: string): Promise<number> {
  return (await stack.db('users').where({ email }).first()).id as number;
}

describe('live socket entry point', () => {
  it('answers an upgrade whose session cookie cannot be decoded with 401, and the server keeps serving', async () => {
    expect(await rawUpgrade({ Cookie: 'bw_session=%' })).toBe(401);
    expect(await rawUpgrade({ Cookie: 'bw_session=%E0%A4%A; other=%%' })).toBe(401);
    expect(await rawUpgrade({ Cookie: '=;;=%;bw_session' })).toBe(401);
    expect((await request(stack.http).get('/api/health')).status).toBe(200);
    const { cookie } = await signIn('tech1@saltmarsh.example');
    const s = await openSocket(cookie);
    await waitFor(() => s.messages.find((m) => m.type === 'hello'), 3000, 'hello');
    s.ws.close();
  });

  it('accepts the session cookie among others and URL-encoded', async () => {
    const { token } = await signIn('tech1@saltmarsh.example');
    const s = await openSocket(`theme=dark; bw_session=${encodeURIComponent(token)}; x=%`);
    await waitFor(() => s.messages.find((m) => m.type === 'hello'), 3000, 'hello');
    s.ws.close();
  });

  it('answers a message it cannot use with an error and keeps the socket and the server running', async () => {
    const { cookie } = await signIn('tech2@saltmarsh.example');
    const s = await openSocket(cookie);
    const hostile = [
      'null',
      '"subscribe"',
      '42',
      '[]',
      '{"type":"subscribe"}',
      '{"type":"subscribe","siteId":{"toString":1}}',
      '{"type":"subscribe","unitId":{"valueOf":1,"toString":1}}',
      '{"type":"subscribe","fleet":"yes"}',
      '{"type":"nope"}',
      '{',
    ];
    for (const text of hostile) s.ws.send(text);
    s.ws.send(Buffer.from([0xff, 0xfe, 0x00]));
    await waitFor(() => s.messages.filter((m) => m.type === 'error').length === hostile.length + 1, 3000, 'one error per bad message');
    expect(s.closed).toBeNull();
    s.ws.send(JSON.stringify({ type: 'subscribe', fleet: true }));
    await waitFor(() => s.messages.find((m) => m.type === 'snapshot'), 3000, 'snapshot after the bad messages');
    expect((await request(stack.http).get('/api/health')).status).toBe(200);
    s.ws.close();
  });

  it('refuses an upgrade from a page on another origin with 403, and accepts its own origin', async () => {
    const { cookie } = await signIn('tech1@saltmarsh.example');
    await expect(openSocket(cookie, { Origin: 'http://evil.example' })).rejects.toThrow('HTTP 403');
    await expect(openSocket(cookie, { Origin: 'null' })).rejects.toThrow('HTTP 403');
    const s = await openSocket(cookie, { Origin: `http://${host()}` });
    await waitFor(() => s.messages.find((m) => m.type === 'hello'), 3000, 'hello');
    s.ws.close();
  });
});

describe('live socket and the session behind it', () => {
  it('closes a socket at once when its session is signed out', async () => {
    const { agent, cookie } = await signIn('engineer@saltmarsh.example');
    const other = await signIn('engineer@saltmarsh.example');
    const s = await openSocket(cookie);
    const kept = await openSocket(other.cookie);
    await agent.post('/api/auth/sign-out').expect(204);
    const closed = await waitFor(() => s.closed, 3000, 'the socket to close');
    expect(closed.code).toBe(4401);
    // Signing out one device leaves the other's socket alone.
    expect(kept.closed).toBeNull();
    kept.ws.close();
  });

  it('closes the sockets of a user who is disabled, demoted or moved to another owner', async () => {
    const admin = (await signIn('admin@saltmarsh.example')).agent;
    const crew = await openSocket((await signIn('crew1@saltmarsh.example')).cookie);
    const tech = await openSocket((await signIn('tech2@saltmarsh.example')).cookie);
    const owner = await openSocket((await signIn('owner@quillmoor.example')).cookie);
    const bystander = await openSocket((await signIn('tech1@saltmarsh.example')).cookie);
    const otherOwner = (
      await stack
        .db('owners')
        .whereNot({ id: (await stack.db('users').where({ email: 'owner@quillmoor.example' }).first()).owner_id })
        .first()
    ).id as number;

    await admin
      .patch(`/api/users/${await userId('crew1@saltmarsh.example')}`)
      .send({ disabled: true })
      .expect(200);
    await admin
      .patch(`/api/users/${await userId('tech2@saltmarsh.example')}`)
      .send({ role: 'crew' })
      .expect(200);
    await admin
      .patch(`/api/users/${await userId('owner@quillmoor.example')}`)
      .send({ ownerId: otherOwner })
      .expect(200);
    for (const s of [crew, tech, owner]) expect((await waitFor(() => s.closed, 3000, 'the socket to close')).code).toBe(4401);
    expect(bystander.closed).toBeNull();
    bystander.ws.close();
  });

  it("closes a socket whose user was disabled behind the server's back at the next periodic check", async () => {
    const s = await openSocket((await signIn('crew2@saltmarsh.example')).cookie);
    await stack.testDb.db('users').where({ email: 'crew2@saltmarsh.example' }).update({ disabled: true });
    expect((await waitFor(() => s.closed, 5000, 'the periodic check to close the socket')).code).toBe(4401);
    await stack.testDb.db('users').where({ email: 'crew2@saltmarsh.example' }).update({ disabled: false });
  });
});

import type { Server } from 'node:http';
import request from 'supertest';
import { DEMO_PASSWORD } from '../../seeds/demo-world';

export type Agent = ReturnType<typeof request.agent>;

/** A signed-in person: a cookie-keeping agent, their user id and their session cookie. */
export interface SignedIn {
  agent: Agent;
  userId: number;
  cookie: string;
}

/**
 * Signs people in once each and keeps their agents: `const as = signedIn(() => stack.http)`, then `(await as(email)).agent`.
 * The server is read when first needed, so the helper can be made before the stack starts.
 */
export function signedIn(server: () => Server): (email: string, password?: string) => Promise<SignedIn> {
  const known = new Map<string, SignedIn>();
  return async (email, password = DEMO_PASSWORD) => {
    const hit = known.get(email);
    if (hit) return hit;
    const agent = request.agent(server());
    const res = await agent.post('/api/auth/sign-in').send({ email, password }).expect(200);
    const me = await agent.get('/api/me').expect(200);
    const who = { agent, userId: me.body.id as number, cookie: String(res.headers['set-cookie']).split(';')[0]! };
    known.set(email, who);
    return who;
  };
}

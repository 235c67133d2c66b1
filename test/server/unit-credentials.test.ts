import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestStack } from '../helpers/test-stack';
import { connectUnit, waitFor } from '../helpers/fake-unit';
import { DEMO_PASSWORD } from '../../seeds/demo-world';

let stack: Awaited<ReturnType<typeof startTestStack>>;
let admin: ReturnType<typeof request.agent>;
beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  admin = request.agent(stack.http);
  await admin
    .post('/api/auth/sign-in')
    .set('Origin', stack.url)
    .send({ email: 'admin@saltmarsh.example', password: DEMO_PASSWORD })
    .expect(200);
});
afterAll(async () => {
  await stack?.stop();
});

async function connectedUnit(serial: string) {
  const u = await connectUnit(stack.broker.port, serial);
  const closed = new Promise<void>((r) => u.once('close', () => r()));
  return { u, closed };
}

describe('unit credentials changed by an admin', () => {
  it("rotating a unit's secret drops its MQTT connection at once, and the old secret no longer connects", async () => {
    const serial = 'QED-2402';
    const { closed } = await connectedUnit(serial);
    const id = stack.units.get(serial)!.id;
    const res = await admin.post(`/api/units/${id}/secret`).set('Origin', stack.url).expect(200);
    expect(res.body.deviceSecret).toEqual(expect.any(String));
    await waitFor(() => closed.then(() => true), 3000, 'disconnect');
    await expect(connectUnit(stack.broker.port, serial)).rejects.toThrow();
    const fresh = await connectUnit(stack.broker.port, serial, res.body.deviceSecret);
    await fresh.endAsync();
  });

  it('disabling a unit drops its MQTT connection at once', async () => {
    const serial = 'QED-2403';
    const { closed } = await connectedUnit(serial);
    const id = stack.units.get(serial)!.id;
    await admin.patch(`/api/units/${id}`).set('Origin', stack.url).send({ disabled: true }).expect(200);
    await waitFor(() => closed.then(() => true), 3000, 'disconnect');
    await expect(connectUnit(stack.broker.port, serial)).rejects.toThrow();
  });
});

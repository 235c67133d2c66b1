import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestStack } from '../helpers/test-stack';
import { startTcpProxy } from '../helpers/tcp-proxy';

let proxy: Awaited<ReturnType<typeof startTcpProxy>>;
let stack: Awaited<ReturnType<typeof startTestStack>>;

beforeAll(async () => {
  proxy = await startTcpProxy(Number(process.env['BW_DB_PORT'] ?? 3308));
  stack = await startTestStack({ dbPort: proxy.port });
});
afterAll(async () => {
  await proxy.restore().catch(() => undefined);
  await stack?.stop();
  await proxy?.close().catch(() => undefined);
});

describe('public health while the database is down', () => {
  it('answers 503 degraded without the database error, its address or anything else about the setup', async () => {
    await proxy.cut();
    const res = await request(stack.http).get('/api/health');
    expect(res.status).toBe(503);
    expect(res.body).toEqual({ status: 'degraded', database: { ok: false }, broker: { ok: true } });
    expect(JSON.stringify(res.body)).not.toMatch(/ECONN|127\.0\.0\.1|connect|Error/i);
    await proxy.restore();
  });
});

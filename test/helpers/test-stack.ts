import { pino } from 'pino';
import { startStack, type Stack, type StackOptions } from '../../server/stack';
import { createTestDatabase, type TestDatabase } from './test-db';

export interface TestStackOptions {
  seed?: boolean;
  env?: Record<string, string>;
  stack?: StackOptions;
  /** Reach the database through this port instead (e.g. a proxy the test can cut). */
  dbPort?: number;
  /** Offer MQTT over TLS too (port 0 picks a free one). */
  brokerTls?: { port: number; certPath: string; keyPath: string };
}

/** The whole server (HTTP, broker, database) on free ports against a fresh test database, serving the built dashboard. */
export async function startTestStack(opts: TestStackOptions = {}): Promise<Stack & { testDb: TestDatabase }> {
  const testDb = await createTestDatabase(opts);
  const config = {
    ...testDb.config,
    port: 0,
    broker: { host: testDb.config.broker.host, port: 0, ...(opts.brokerTls ? { tls: opts.brokerTls } : {}) },
    db: { ...testDb.config.db, port: opts.dbPort ?? testDb.config.db.port },
    sessionSecret: 'test-secret-test-secret-test-secret-0',
  };
  // No background warming of the modelled best: a test stack lives seconds (landscape-warm.test.ts covers the warmer).
  // No statement lock job either: tests that write past months would race it (statement-lock.test.ts sweeps by hand).
  const stack = await startStack(config, pino({ level: process.env['BW_TEST_LOG_LEVEL'] ?? 'silent' }), {
    warmLandscapes: false,
    ...opts.stack,
    statements: { autoLock: false, ...opts.stack?.statements },
  });
  return {
    ...stack,
    testDb,
    stop: async () => {
      await stack.stop();
      await testDb.drop();
    },
  };
}

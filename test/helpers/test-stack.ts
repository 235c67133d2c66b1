import { pino } from 'pino';
import { startStack, type Stack } from '../../server/stack';
import { createTestDatabase, type TestDatabase } from './test-db';

/** The whole server (HTTP, broker, database) on free ports against a fresh test database, serving the built dashboard. */
export async function startTestStack(opts: { seed?: boolean; env?: Record<string, string> } = {}): Promise<Stack & { testDb: TestDatabase }> {
  const testDb = await createTestDatabase(opts);
  const config = { ...testDb.config, port: 0, broker: { ...testDb.config.broker, port: 0 }, sessionSecret: 'test-secret-test-secret-test-secret-0' };
  const stack = await startStack(config, pino({ level: process.env['BW_LOG_LEVEL'] ?? 'silent' }));
  return {
    ...stack,
    testDb,
    stop: async () => {
      await stack.stop();
      await testDb.drop();
    },
  };
}

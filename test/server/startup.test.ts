import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const main = fileURLToPath(new URL('../../server/main.ts', import.meta.url));
const run = (env: Record<string, string>) =>
  spawnSync(process.execPath, ['--import', 'tsx', main], {
    env: { PATH: process.env['PATH'] ?? '', BW_LOG_LEVEL: 'silent', ...env },
    encoding: 'utf8',
    timeout: 20_000,
  });

describe('start-up', () => {
  it('stops with one clear line naming host, port and the fix when MariaDB is unreachable', () => {
    const r = run({ BW_DB_HOST: '127.0.0.1', BW_DB_PORT: '9', BW_PORT: '0', BW_BROKER_PORT: '0' });
    expect(r.status).toBe(1);
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/MariaDB at 127\.0\.0\.1:9 .*connection refused.*npm run db -- start/);
  });

  it('stops with one line naming the file store when its bucket does not answer', () => {
    const db = Object.fromEntries(Object.entries(process.env).filter(([k]) => k.startsWith('BW_DB_'))) as Record<string, string>;
    const r = run({
      ...db,
      BW_PORT: '0',
      BW_BROKER_PORT: '0',
      BW_S3_BUCKET: 'bw-ticket-files',
      BW_S3_ENDPOINT: 'http://127.0.0.1:9',
      BW_S3_ACCESS_KEY_ID: 'AKIDEXAMPLE',
      BW_S3_SECRET_ACCESS_KEY: 'not-a-real-secret',
    });
    expect(r.status).toBe(1);
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(
      /^Brightward cannot start: Cannot open the file store: the file store's bucket bw-ticket-files at http:\/\/127\.0\.0\.1:9 does not answer \(.*ECONNREFUSED.*\); check BW_S3_ENDPOINT, BW_S3_BUCKET, BW_S3_REGION and the credentials$/,
    );
  });

  it('refuses invalid configuration, naming each bad variable', () => {
    const r = run({ BW_PORT: 'eighty', BW_LOG_LEVEL: 'loud' });
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/BW_PORT/);
    expect(r.stderr).toMatch(/BW_LOG_LEVEL/);
  });

  it('refuses a mail server port that is no port, naming it, before anything starts', () => {
    const r = run({ BW_SMTP_PORT: '0' });
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toBe('Invalid configuration:\n  BW_SMTP_PORT: a TCP port, a whole number from 1 to 65535');
  });
});

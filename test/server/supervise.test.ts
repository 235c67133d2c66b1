import { describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { waitFor } from '../helpers/fake-unit';

const script = fileURLToPath(new URL('../../server/scripts/supervise.sh', import.meta.url));

function supervise(command: string) {
  const p = spawn('bash', [script, 'server', 'bash', '-c', command], { stdio: ['ignore', 'ignore', 'pipe'] });
  let stderr = '';
  p.stderr.on('data', (d) => (stderr += String(d)));
  const exited = new Promise<number | null>((res) => p.on('exit', (code) => res(code)));
  return { p, exited, stderr: () => stderr };
}

describe('npm start supervises the server', () => {
  it('starts a server that died again, says so, and gives up after 5 exits within a minute', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'bw-sup-'));
    const log = join(dir, 'runs');
    const s = supervise(`echo run >> ${log}; exit 3`);
    expect(await s.exited).toBe(1);
    expect(readFileSync(log, 'utf8').trim().split('\n')).toHaveLength(5);
    expect(s.stderr()).toMatch(/the server stopped unexpectedly \(exit status 3\); starting it again/);
    expect(s.stderr()).toMatch(/exited 5 times within a minute/);
    rmSync(dir, { recursive: true, force: true });
  }, 20_000);

  // Repeated: a SIGTERM that arrives right after the fork, before the script has noted the child, once left it running.
  it('passes SIGTERM to the server and does not start it again', async () => {
    for (let round = 0; round < 8; round++) {
      const dir = mkdtempSync(join(tmpdir(), 'bw-sup-'));
      const log = join(dir, 'runs');
      // The trap is set before "run" is written: a SIGTERM sent as soon as the test sees "run" cannot beat it.
      const s = supervise(`trap 'echo stopped >> ${log}; exit 0' TERM; echo run >> ${log}; while :; do sleep 0.05; done`);
      await waitFor(
        () => {
          try {
            return readFileSync(log, 'utf8').includes('run');
          } catch {
            return false;
          }
        },
        5000,
        'first run',
      );
      s.p.kill('SIGTERM');
      expect(await s.exited).toBe(0);
      expect(readFileSync(log, 'utf8').trim().split('\n'), `round ${round}`).toEqual(['run', 'stopped']);
      expect(s.stderr()).not.toMatch(/starting it again/);
      rmSync(dir, { recursive: true, force: true });
    }
  }, 20_000);
});

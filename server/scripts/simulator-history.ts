import { spawn } from 'node:child_process';
import { dirname, resolve } from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import type { HistoryLine } from '../../shared/contracts/history-stream';
import type { HistoryRequest, HistorySource } from '../services/demo-history';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');

/**
 * The simulator's history stream (simulator/history-cli.ts) as a HistorySource: one child process per window, its
 * JSON lines read as they come (the child generates while the server stores).
 */
export function simulatorHistorySource(): HistorySource {
  return {
    async *run(req: HistoryRequest): AsyncIterable<HistoryLine> {
      const args = [
        '--import',
        'tsx',
        resolve(ROOT, 'simulator/history-cli.ts'),
        '--mode',
        req.mode,
        '--from',
        new Date(req.fromMs).toISOString(),
        '--to',
        new Date(req.toMs).toISOString(),
        '--seed',
        req.seed,
        '--serials',
        req.serials.join(','),
        ...(req.faults ? [] : ['--no-faults']),
      ];
      const child = spawn(process.execPath, args, { cwd: ROOT, stdio: ['ignore', 'pipe', 'inherit'] });
      const exited = new Promise<number | null>((res) => child.on('close', (code) => res(code)));
      let ended = false;
      try {
        for await (const text of createInterface({ input: child.stdout, crlfDelay: Infinity })) {
          const line = JSON.parse(text) as HistoryLine;
          if (line.k === 'end') ended = true;
          yield line;
        }
      } finally {
        if (!ended) child.kill('SIGTERM');
      }
      const code = await exited;
      if (code !== 0 || !ended)
        throw new Error(`the simulator's history stream stopped (exit code ${code}) for ${req.mode} ${args[6]} … ${args[8]}`);
    },
  };
}

import { spawn, type ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';

const main = fileURLToPath(new URL('../../server/main.ts', import.meta.url));
const workerMain = fileURLToPath(new URL('../../server/worker.ts', import.meta.url));

export interface ServerProcess {
  proc: ChildProcess;
  url: string;
  brokerPort: number;
  /** Resident memory of the server process [MiB] (Linux /proc). */
  rssMb(): number;
  /** Whether it is still running. */
  alive(): boolean;
  kill(signal: NodeJS.Signals): Promise<number | null>;
  /**
   * Resolves with the first log line (parsed) whose `msg` is `msg` (and that `match` accepts), seen since the start;
   * rejects after `timeoutMs`.
   */
  waitForLog(msg: string, timeoutMs: number, match?: (line: Record<string, unknown>) => boolean): Promise<Record<string, unknown>>;
}

/** The real server (server/main.ts) as its own process on free ports, against the given database; resolves once it says it is ready. */
export async function startServerProcess(database: string, env: Record<string, string> = {}): Promise<ServerProcess> {
  return startProcess(main, 'Brightward server ready', database, env);
}

/** An ingest worker (server/worker.ts) as its own process against the given database; `url` and `brokerPort` are empty. */
export async function startWorkerProcess(database: string, env: Record<string, string>): Promise<ServerProcess> {
  return startProcess(workerMain, 'Brightward worker ready', database, env);
}

async function startProcess(entry: string, readyMsg: string, database: string, env: Record<string, string>): Promise<ServerProcess> {
  const proc = spawn(process.execPath, ['--import', 'tsx', entry], {
    env: {
      ...process.env,
      BW_DB_NAME: database,
      BW_PORT: '0',
      BW_BROKER_PORT: '0',
      BW_LOG_LEVEL: 'info',
      BW_S3_LOCAL_DIR: join(tmpdir(), `${database}-s3`),
      ...env,
    },
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  let exited = false;
  const exit = new Promise<number | null>((res) =>
    proc.once('exit', (code) => {
      exited = true;
      res(code);
    }),
  );
  const logs: Record<string, unknown>[] = [];
  const logWaiters = new Set<() => void>();
  const ready = await new Promise<{ url: string; brokerPort: number }>((res, rej) => {
    void exit.then((code) => rej(new Error(`server exited with ${code} before it was ready`)));
    createInterface({ input: proc.stdout! }).on('line', (line) => {
      try {
        const m = JSON.parse(line) as { msg?: string; url?: string; brokerPort?: number };
        logs.push(m);
        for (const w of logWaiters) w();
        if (m.msg === readyMsg) res({ url: m.url ?? '', brokerPort: m.brokerPort ?? 0 });
      } catch {
        /* not a log line */
      }
    });
  });
  const waitForLog = (msg: string, timeoutMs: number, match: (line: Record<string, unknown>) => boolean = () => true) =>
    new Promise<Record<string, unknown>>((res, rej) => {
      const look = () => {
        const hit = logs.find((l) => l['msg'] === msg && match(l));
        if (!hit) return;
        logWaiters.delete(look);
        clearTimeout(timer);
        res(hit);
      };
      const timer = setTimeout(() => {
        logWaiters.delete(look);
        rej(new Error(`no "${msg}" in the server log within ${timeoutMs} ms`));
      }, timeoutMs);
      logWaiters.add(look);
      look();
    });
  return {
    proc,
    ...ready,
    rssMb: () => {
      const kb = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${proc.pid}/status`, 'utf8'));
      return kb ? Number(kb[1]) / 1024 : Number.NaN;
    },
    alive: () => !exited,
    waitForLog,
    kill: async (signal) => {
      if (!exited) proc.kill(signal);
      return exit;
    },
  };
}

/**
 * CPU seconds of processes on this machine, from /proc/<pid>/stat (utime + stime, every thread of the process), so a
 * benchmark can split the machine's CPU between the server, its load generators and MariaDB. Linux only.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';

let ticksPerS: number | undefined;

/** Clock ticks per second of /proc's times (`getconf CLK_TCK`, 100 on every common Linux). */
function clockTicks(): number {
  if (ticksPerS === undefined) {
    const n = Number(execFileSync('getconf', ['CLK_TCK'], { encoding: 'utf8' }).trim());
    ticksPerS = Number.isFinite(n) && n > 0 ? n : 100;
  }
  return ticksPerS;
}

/** User + system CPU a process has used so far [s], or null when it is gone or /proc is not readable. */
export function cpuSecondsOf(pid: number): number | null {
  let stat: string;
  try {
    stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
  } catch {
    return null;
  }
  // The command name (field 2) is in parentheses and may hold spaces: fields are counted after its closing one.
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  const utime = Number(fields[11]);
  const stime = Number(fields[12]);
  return Number.isFinite(utime) && Number.isFinite(stime) ? (utime + stime) / clockTicks() : null;
}

/** CPU used by groups of processes between two readings [s]. */
export class CpuSplit<G extends string> {
  private start = new Map<number, number>();

  constructor(private readonly groups: Record<G, () => number[]>) {}

  mark(): void {
    this.start.clear();
    for (const pids of Object.values<() => number[]>(this.groups)) for (const pid of pids()) this.start.set(pid, cpuSecondsOf(pid) ?? 0);
  }

  /** CPU seconds of each group since `mark()`. */
  read(): Record<G, number> {
    const out = {} as Record<G, number>;
    for (const [group, pids] of Object.entries<() => number[]>(this.groups)) {
      let s = 0;
      for (const pid of pids()) s += (cpuSecondsOf(pid) ?? 0) - (this.start.get(pid) ?? 0);
      out[group as G] = s;
    }
    return out;
  }
}

/** Busy CPU seconds of the whole machine so far (every core; /proc/stat minus idle and iowait), or null off Linux. */
export function machineBusySeconds(): number | null {
  let stat: string;
  try {
    stat = readFileSync('/proc/stat', 'utf8');
  } catch {
    return null;
  }
  const line = stat.split('\n', 1)[0]!;
  const t = line.trim().split(/\s+/).slice(1).map(Number);
  // user nice system idle iowait irq softirq steal (guest time is already inside user)
  const busy = (t[0] ?? 0) + (t[1] ?? 0) + (t[2] ?? 0) + (t[5] ?? 0) + (t[6] ?? 0) + (t[7] ?? 0);
  return busy / clockTicks();
}

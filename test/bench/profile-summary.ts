/**
 * `node --import tsx test/bench/profile-summary.ts <file.cpuprofile> [--top 25] [--json]`
 *
 * Reads a V8 CPU profile (from `node --cpu-prof`, or `bench:ingest -- --cpu-profile <file>`) and prints where the time
 * went: self time by package or source folder, and the functions with the most self time (the widest leaves of the
 * flame graph), as shares of the busy samples (idle left out). Text tables, for the README's Performance section.
 */
import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';

interface CallFrame {
  functionName: string;
  url: string;
  lineNumber: number;
}
interface ProfileNode {
  id: number;
  callFrame: CallFrame;
}
interface CpuProfile {
  nodes: ProfileNode[];
  samples: number[];
  timeDeltas: number[];
  startTime: number;
  endTime: number;
}

const { values: args, positionals } = parseArgs({
  allowPositionals: true,
  options: { top: { type: 'string', default: '25' }, json: { type: 'boolean', default: false } },
});
if (positionals.length !== 1) {
  console.error('usage: profile-summary.ts <file.cpuprofile> [--top 25] [--json]');
  process.exit(2);
}
const profile = JSON.parse(readFileSync(positionals[0]!, 'utf8')) as CpuProfile;
const nodes = new Map(profile.nodes.map((n) => [n.id, n]));

/** Where a function lives: its npm package, `node:` module, the project's top folder, or V8's own bucket. */
function area(cf: CallFrame): string {
  const u = cf.url;
  const pkg = /node_modules\/((?:@[^/]+\/)?[^/]+)/.exec(u);
  if (pkg) return pkg[1]!;
  if (u.startsWith('node:')) return 'node (streams, net, timers…)';
  const own = /\/(server|broker|shared|test|simulator)\/(?:([^/]+)\/)?/.exec(u);
  if (own) return own[2] && !own[2].includes('.') ? `${own[1]}/${own[2]}` : own[1]!;
  if (cf.functionName === '(garbage collector)') return '(garbage collector)';
  return '(V8 and native: JSON, buffers, syscalls)';
}

const byArea = new Map<string, number>();
const byFunction = new Map<string, number>();
let busy = 0;
for (const id of profile.samples) {
  const cf = nodes.get(id)!.callFrame;
  if (cf.functionName === '(idle)' || cf.functionName === '(program)') continue;
  busy++;
  const a = area(cf);
  byArea.set(a, (byArea.get(a) ?? 0) + 1);
  const file = cf.url.split('/').slice(-2).join('/') || '(native)';
  const name = `${cf.functionName || '(anonymous)'}  ${cf.url.includes('node_modules/') ? `${a}: ${cf.url.split('/').at(-1)}` : file}`;
  byFunction.set(name, (byFunction.get(name) ?? 0) + 1);
}
const top = Number(args.top);
const share = (n: number) => Math.round((n / Math.max(1, busy)) * 1000) / 10;
const rows = (m: Map<string, number>, n: number) =>
  [...m.entries()]
    .sort((a, b) => b[1] - a[1])
    .slice(0, n)
    .map(([k, v]) => ({ share: share(v), name: k }));
const result = {
  busySamples: busy,
  seconds: Math.round((profile.endTime - profile.startTime) / 1e4) / 100,
  areas: rows(byArea, 40),
  functions: rows(byFunction, top),
};
if (args.json) console.log(JSON.stringify(result));
else {
  console.log(`${busy} busy samples over ${result.seconds} s`);
  console.log('\n| self time | where |\n|---:|---|');
  for (const r of result.areas) console.log(`| ${r.share} % | ${r.name} |`);
  console.log('\n| self time | function |\n|---:|---|');
  for (const r of result.functions) console.log(`| ${r.share} % | \`${r.name}\` |`);
}

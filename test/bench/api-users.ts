/**
 * Dashboard users for the API benchmark, as a child process: each signs in, keeps its live socket open and opens one
 * view every `periodMs`, in turn: fleet board, alarms, a unit view, a day of traces — with the requests the dashboard
 * makes for that view, in parallel. Reports every request's latency and the socket lag (receive time − report time).
 *
 * argv: <base url> <period ms> <duration s> <json users file: [{ email, password, unitId, siteId }]>
 */
import { readFileSync } from 'node:fs';
import WebSocket from 'ws';
import type { LiveServerMessage } from '../../shared/contracts/live';

interface User {
  email: string;
  password: string;
  unitId: number;
  siteId: number;
}
const [base, periodArg, durationArg, usersFile] = process.argv.slice(2);
if (!base || !periodArg || !durationArg || !usersFile) throw new Error('usage: api-users <base url> <period ms> <duration s> <users file>');
const PERIOD_MS = Number(periodArg);
const DURATION_MS = Number(durationArg) * 1000;
const users = JSON.parse(readFileSync(usersFile!, 'utf8')) as User[];
const latencies: number[] = [];
/** Latencies by route shape (ids and queries stripped), to see which view is slow. */
const byRoute: Record<string, number[]> = {};
const socketLags: number[] = [];
const errors: string[] = [];
let measuring = false;

async function get(path: string, cookie: string): Promise<void> {
  const t0 = performance.now();
  try {
    const res = await fetch(`${base}${path}`, { headers: { cookie } });
    await res.arrayBuffer();
    if (!res.ok) errors.push(`${res.status} ${path}`);
  } catch (e) {
    errors.push(`${(e as Error).message} ${path}`);
  }
  if (measuring) {
    const ms = performance.now() - t0;
    latencies.push(ms);
    (byRoute[path.split('?')[0]!.replace(/\/\d+/g, '/:id') + (path.includes('state=') ? '?' + /state=\w+/.exec(path)![0] : '')] ??=
      []).push(ms);
  }
}

function views(u: User, dayFrom: string, dayTo: string, hourFrom: string, now: string): { subscribe: object; paths: string[] }[] {
  const q = (o: Record<string, string>) => new URLSearchParams(o).toString();
  return [
    {
      subscribe: { fleet: true },
      paths: ['/api/sites', '/api/units', '/api/alarms?state=active', `/api/sites/${u.siteId}/landscape/best`],
    },
    { subscribe: { fleet: true }, paths: ['/api/sites', '/api/alarms?state=active', '/api/alarms?state=cleared'] },
    {
      subscribe: { unitId: u.unitId },
      paths: [
        `/api/units/${u.unitId}`,
        `/api/sites/${u.siteId}`,
        `/api/units/${u.unitId}/state`,
        `/api/units/${u.unitId}/commands`,
        `/api/units/${u.unitId}/telemetry?${q({ from: hourFrom, to: now })}`,
        `/api/alarms?unitId=${u.unitId}`,
      ],
    },
    {
      subscribe: { siteId: u.siteId },
      paths: [
        '/api/sites',
        `/api/units?siteId=${u.siteId}`,
        `/api/units/${u.unitId}/traces?${q({ from: dayFrom, to: dayTo, points: '1200' })}`,
      ],
    },
  ];
}

async function runUser(u: User, index: number): Promise<void> {
  const res = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: u.email, password: u.password }),
  });
  if (!res.ok) throw new Error(`sign-in of ${u.email}: ${res.status}`);
  const cookie = res.headers.get('set-cookie')!.split(';')[0]!;
  const ws = new WebSocket(`${base!.replace('http', 'ws')}/ws`, { headers: { cookie } });
  await new Promise((r, j) => {
    ws.once('open', r);
    ws.once('error', j);
  });
  ws.on('message', (d) => {
    const m = JSON.parse(String(d)) as LiveServerMessage;
    if (measuring && m.type === 'units')
      for (const s of m.units) if (s.lastReportAt) socketLags.push(Date.now() - Date.parse(s.lastReportAt));
  });
  let current: object | undefined;
  let turn = index % 4;
  // Users start spread over the period, as people do.
  await new Promise((r) => setTimeout(r, (index / users.length) * PERIOD_MS));
  const end = Date.now() + DURATION_MS;
  while (Date.now() < end) {
    const started = Date.now();
    const now = new Date();
    const day = new Date(now.getTime() - 86_400_000);
    const v = views(u, day.toISOString(), now.toISOString(), new Date(now.getTime() - 3_600_000).toISOString(), now.toISOString())[turn]!;
    turn = (turn + 1) % 4;
    if (current) ws.send(JSON.stringify({ type: 'unsubscribe', ...current }));
    ws.send(JSON.stringify({ type: 'subscribe', ...v.subscribe }));
    current = v.subscribe;
    await Promise.all(v.paths.map((p) => get(p, cookie)));
    await new Promise((r) => setTimeout(r, Math.max(0, PERIOD_MS - (Date.now() - started))));
  }
  ws.close();
}

process.on('message', (m: { type: string }) => {
  if (m.type === 'measure') measuring = true;
});
Promise.all(users.map(runUser)).then(
  () => {
    process.send?.({ type: 'done', latencies, socketLags, errors, byRoute });
    setTimeout(() => process.exit(0), 100);
  },
  (e) => {
    console.error(String(e));
    process.exit(1);
  },
);

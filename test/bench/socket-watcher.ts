/**
 * A browser-like live socket for the benchmarks, as its own process (a dashboard does not share the server's event
 * loop, so its JSON parsing must not be billed to the server): subscribes to the whole fleet and, while measuring,
 * records publish → receive lag for every unit state (receive time − the report's time).
 *
 * argv: <ws url> <session cookie>. IPC: { type: 'measure', on } → on false it answers { type: 'socketLags', lags }.
 */
import WebSocket from 'ws';
import type { LiveServerMessage } from '../../shared/contracts/live';

const [url, cookie] = process.argv.slice(2);
let measuring = false;
let lags: number[] = [];
const ws = new WebSocket(url!, { headers: { Cookie: cookie! } });
ws.once('open', () => {
  ws.send(JSON.stringify({ type: 'subscribe', fleet: true }));
  process.send?.({ type: 'ready' });
});
ws.on('message', (d) => {
  if (!measuring) return;
  const now = Date.now();
  const m = JSON.parse(String(d)) as LiveServerMessage;
  if (m.type === 'units') for (const u of m.units) if (u.lastReportAt) lags.push(now - Date.parse(u.lastReportAt));
});
ws.on('error', (err) => {
  console.error(`socket watcher: ${err.message}`);
  process.exit(1);
});
process.on('message', (m: { type: string; on?: boolean }) => {
  if (m.type !== 'measure') return;
  measuring = m.on ?? false;
  if (measuring) lags = [];
  else process.send?.({ type: 'socketLags', lags });
});
process.on('disconnect', () => process.exit(0));

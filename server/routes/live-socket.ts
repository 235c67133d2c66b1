import type { Server } from 'node:http';
import { WebSocketServer, type WebSocket } from 'ws';
import type { Logger } from 'pino';
import type { LiveClientMessage } from '../../shared/contracts/live';
import type { AuthService } from '../services/auth-service';
import type { LiveHub } from '../services/live-hub';
import { SESSION_COOKIE } from './access';

/** `/ws`: the live stream. Authenticated by the session cookie on the upgrade request; 401 closes before upgrading. */
export function attachLiveSocket(http: Server, auth: AuthService, hub: LiveHub, log: Logger): WebSocketServer {
  const wss = new WebSocketServer({ noServer: true, maxPayload: 16 * 1024 });
  http.on('upgrade', (req, socket, head) => {
    if (!req.url?.startsWith('/ws')) {
      socket.destroy();
      return;
    }
    const token = new RegExp(`(?:^|;\\s*)${SESSION_COOKIE}=([^;]+)`).exec(req.headers.cookie ?? '')?.[1];
    auth.verify(token ? decodeURIComponent(token) : undefined).then(
      (caller) => wss.handleUpgrade(req, socket, head, (ws) => serve(ws, caller)),
      () => {
        socket.write('HTTP/1.1 401 Unauthorized\r\nConnection: close\r\nContent-Length: 0\r\n\r\n');
        socket.destroy();
      },
    );
  });

  function serve(ws: WebSocket, caller: Parameters<LiveHub['connect']>[0]) {
    const session = hub.connect(caller, (msg) => {
      // A client that cannot keep up is dropped rather than buffered without bound; it reconnects and gets a snapshot.
      if (ws.bufferedAmount > 4 * 1024 * 1024) return ws.terminate();
      if (ws.readyState === ws.OPEN) ws.send(JSON.stringify(msg));
    });
    ws.on('message', (data) => {
      let msg: LiveClientMessage;
      try {
        msg = JSON.parse(String(data));
      } catch {
        return ws.send(JSON.stringify({ type: 'error', code: 'malformed_json', message: 'Messages must be JSON.' }));
      }
      if (!msg || (msg.type !== 'subscribe' && msg.type !== 'unsubscribe')) {
        return ws.send(JSON.stringify({ type: 'error', code: 'bad_message', message: 'type must be subscribe or unsubscribe.' }));
      }
      session.handle(msg);
    });
    ws.on('close', () => session.close());
    ws.on('error', (err) => log.debug({ err }, 'live socket error'));
  }
  return wss;
}

import type { IncomingMessage, Server } from 'node:http';
import type { Duplex } from 'node:stream';
import { parse as parseCookies } from 'cookie';
import { WebSocketServer, type RawData, type WebSocket } from 'ws';
import { z } from 'zod';
import type { Logger } from 'pino';
import type { LiveClientMessage, LiveServerMessage } from '../../shared/contracts/live';
import { AppError } from '../errors/app-error';
import type { AuthService, SessionCaller } from '../services/auth-service';
import type { LiveHub, LiveSession } from '../services/live-hub';
import { endsSession, type SessionEvents } from '../services/session-events';
import { SESSION_COOKIE } from './access';
import { isForeignOrigin } from './origin-check';

export interface LiveSocketOptions {
  /** Origins besides the request's own host that may open the socket (BW_ALLOWED_ORIGINS). */
  allowedOrigins: ReadonlySet<string>;
  /** How often every open socket's session is checked again [ms]: the backstop behind the at-once notices. */
  sessionRecheckMs: number;
}

export interface LiveSocket {
  /** Sockets open now. */
  readonly open: number;
  /** Closes every socket and stops the periodic check. */
  close(): void;
}

/** Close code sent when the session behind a socket has ended; the dashboard then asks for a new sign-in. */
export const SESSION_ENDED_CLOSE = 4401;

const clientMessage = z.strictObject({
  type: z.enum(['subscribe', 'unsubscribe']),
  fleet: z.boolean().optional(),
  siteId: z.number().int().positive().optional(),
  unitId: z.number().int().positive().optional(),
});

interface Connection {
  ws: WebSocket;
  caller: SessionCaller;
  live: LiveSession;
  ended: boolean;
}

/**
 * The hub hands one message object to every socket that gets it within one synchronous pass (a flush reaches each
 * fleet dashboard with the same object), so its JSON is made once and reused; entries go with the message.
 */
const texts = new WeakMap<LiveServerMessage, string>();
function serialized(msg: LiveServerMessage): string {
  let text = texts.get(msg);
  if (text === undefined) {
    text = JSON.stringify(msg);
    texts.set(msg, text);
  }
  return text;
}

const STATUS_TEXT: Record<number, string> = {
  400: 'Bad Request',
  401: 'Unauthorized',
  403: 'Forbidden',
  404: 'Not Found',
  503: 'Service Unavailable',
};

/** Answers an upgrade request with a plain HTTP error in the one error shape, then closes the connection. */
function refuse(socket: Duplex, status: number, code: string, message: string): void {
  if (socket.destroyed) return;
  const body = JSON.stringify({ error: { code, message } });
  socket.once('finish', () => socket.destroy());
  socket.end(
    `HTTP/1.1 ${status} ${STATUS_TEXT[status] ?? 'Error'}\r\nConnection: close\r\nContent-Type: application/json\r\n` +
      `Content-Length: ${Buffer.byteLength(body)}\r\n\r\n${body}`,
  );
}

/**
 * `/ws`: the live stream. The upgrade needs the session cookie (401 otherwise) and, from a browser, the server's own
 * origin (403 otherwise). A socket lives only as long as its session: it is closed at once when the session is signed
 * out or revoked (a notice from the services), and a periodic check catches anything that changed behind their back.
 * Every entry point here (upgrade, message, notice, timer) catches its own failures: no client can stop the process.
 */
export function attachLiveSocket(
  http: Server,
  auth: AuthService,
  hub: LiveHub,
  events: SessionEvents,
  log: Logger,
  opts: LiveSocketOptions,
): LiveSocket {
  const wss = new WebSocketServer({ noServer: true, maxPayload: 16 * 1024 });
  const connections = new Set<Connection>();

  http.on('upgrade', (req: IncomingMessage, socket: Duplex, head: Buffer) => {
    // Node removes its own error listener from upgraded sockets: a reset during the upgrade would otherwise throw.
    socket.on('error', (err) => log.debug({ err }, 'live socket: connection error during upgrade'));
    try {
      upgrade(req, socket, head);
    } catch (err) {
      log.error({ err, url: req.url }, 'live socket: upgrade failed');
      refuse(socket, 400, 'bad_request', 'The upgrade request could not be read.');
    }
  });

  function upgrade(req: IncomingMessage, socket: Duplex, head: Buffer): void {
    if (new URL(req.url ?? '/', 'http://localhost').pathname !== '/ws')
      return refuse(socket, 404, 'not_found', 'The live stream is at /ws.');
    if (isForeignOrigin(req.headers, opts.allowedOrigins))
      return refuse(socket, 403, 'foreign_origin', 'Live connections from pages on another site are refused.');
    const token = parseCookies(req.headers.cookie ?? '')[SESSION_COOKIE];
    auth
      .verify(token)
      .then(
        (caller) => {
          if (socket.destroyed) return;
          wss.handleUpgrade(req, socket, head, (ws) => serve(ws, caller));
        },
        (err: unknown) => {
          if (err instanceof AppError && err.status === 401) return refuse(socket, 401, err.code, err.message);
          log.error({ err }, 'live socket: session check failed');
          refuse(socket, 503, 'unavailable', 'The session could not be checked. Try again shortly.');
        },
      )
      .catch((err: unknown) => {
        log.error({ err }, 'live socket: upgrade failed');
        socket.destroy();
      });
  }

  function serve(ws: WebSocket, caller: SessionCaller): void {
    let sendFailed = false;
    const send = (msg: LiveServerMessage) => {
      try {
        // A client that cannot keep up is dropped rather than buffered without bound; it reconnects and gets a snapshot.
        if (ws.bufferedAmount > 4 * 1024 * 1024) return ws.terminate();
        if (ws.readyState === ws.OPEN) ws.send(serialized(msg));
      } catch (err) {
        if (!sendFailed) log.warn({ err, userId: caller.id }, 'live socket: send failed; dropping the socket');
        sendFailed = true;
        ws.terminate();
      }
    };
    const conn: Connection = { ws, caller, live: hub.connect(caller, send), ended: false };
    connections.add(conn);
    ws.on('message', (data, isBinary) => {
      try {
        onMessage(conn, data, isBinary, send);
      } catch (err) {
        log.error({ err, userId: caller.id }, 'live socket: message handling failed');
        send({ type: 'error', code: 'internal', message: 'The message could not be handled; it has been logged.' });
      }
    });
    ws.on('close', () => {
      connections.delete(conn);
      conn.live.close();
    });
    ws.on('error', (err) => log.debug({ err }, 'live socket error'));
  }

  function onMessage(conn: Connection, data: RawData, isBinary: boolean, send: (msg: LiveServerMessage) => void): void {
    if (conn.ended) return;
    let json: unknown;
    try {
      if (isBinary) throw new Error('binary');
      json = JSON.parse(String(data));
    } catch {
      return send({ type: 'error', code: 'malformed_json', message: 'Messages must be JSON text.' });
    }
    const msg = clientMessage.safeParse(json);
    if (!msg.success) {
      return send({
        type: 'error',
        code: 'bad_message',
        message: 'Send { "type": "subscribe" | "unsubscribe" } with one of fleet: true, siteId or unitId (positive whole numbers).',
      });
    }
    conn.live.handle(msg.data as LiveClientMessage);
  }

  /** Stops the stream at once and tells the client why; the dashboard then asks for a new sign-in. */
  function end(conn: Connection): void {
    if (conn.ended) return;
    conn.ended = true;
    conn.live.close();
    try {
      conn.ws.close(SESSION_ENDED_CLOSE, 'Your session has ended. Sign in again.');
    } catch {
      conn.ws.terminate();
    }
  }

  const unsubscribe = events.on((e) => {
    try {
      for (const conn of connections) if (endsSession(e, conn.caller.id, conn.caller.sessionId)) end(conn);
    } catch (err) {
      log.error({ err }, 'live socket: session notice failed');
    }
  });

  // The backstop: a session or user changed without a notice (another process, a direct database change) is caught
  // here, including a change of role or owner the socket was scoped by.
  let checking = false;
  let checkFailing = false;
  const timer = setInterval(() => {
    if (checking || !connections.size) return;
    checking = true;
    const open = [...connections];
    auth
      .liveSessions([...new Set(open.map((c) => c.caller.sessionId))])
      .then((live) => {
        for (const conn of open) {
          const now = live.get(conn.caller.sessionId);
          if (!now || now.id !== conn.caller.id || now.role !== conn.caller.role || now.ownerId !== conn.caller.ownerId) end(conn);
        }
        if (checkFailing) log.info('live socket: session check works again');
        checkFailing = false;
      })
      .catch((err: unknown) => {
        // Sockets stay open while the database cannot say; the check runs again next time.
        if (!checkFailing) log.error({ err }, 'live socket: session check failed');
        checkFailing = true;
      })
      .finally(() => {
        checking = false;
      });
  }, opts.sessionRecheckMs);
  timer.unref();

  return {
    get open() {
      return connections.size;
    },
    close() {
      clearInterval(timer);
      unsubscribe();
      // Upgraded sockets are no longer the HTTP server's to close, and an open dashboard would hold a graceful stop
      // forever: say "going away" (clients reconnect to the next server), then drop whatever has not closed.
      for (const conn of connections) conn.ws.close(1001, 'server stopping');
      setTimeout(() => {
        for (const conn of connections) conn.ws.terminate();
      }, 500).unref();
      wss.close();
    },
  };
}

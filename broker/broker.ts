import { Aedes, type AuthenticateError, type Client } from 'aedes';
import { createServer, type Server } from 'node:net';
import type { AddressInfo } from 'node:net';

/** Who a connected client is: a field unit (confined to its own topic prefix) or a server-side service. */
export type Principal = { kind: 'unit'; serial: string } | { kind: 'service'; name: string };

export interface BrokerOptions {
  host: string;
  /** TCP port; 0 picks a free one (tests). */
  port: number;
  /** Checks a CONNECT's username and password; resolves the principal, or null to refuse with "not authorized". */
  authenticate: (username: string, password: string) => Promise<Principal | null>;
  /** Topic prefix of a unit; a unit may publish and subscribe only below it. */
  unitPrefix: (serial: string) => string;
  onClientGone?: (principal: Principal, clientId: string) => void;
  /** A publish the ACL refused (aedes then disconnects the client: MQTT 3.1.1 has no per-message refusal). */
  onDenied?: (principal: Principal | undefined, topic: string) => void;
}

export interface RunningBroker {
  aedes: Aedes;
  port: number;
  clients(): number;
  close(): Promise<void>;
}

/** MQTT 3.1.1 broker (aedes) on plain TCP, with per-unit credentials and topic ACL. */
export async function startBroker(opts: BrokerOptions): Promise<RunningBroker> {
  const principals = new WeakMap<Client, Principal>();
  const aedes = await Aedes.createBroker({
    authenticate: (client, username, password, done) => {
      opts
        .authenticate(username ?? '', password?.toString('utf8') ?? '')
        .then((p) => {
          if (!p) {
            const err = new Error('Bad username or password') as AuthenticateError;
            err.returnCode = 4 as AuthenticateError['returnCode']; // BAD_USERNAME_OR_PASSWORD (aedes AuthErrorCode is a const enum)
            return done(err, false);
          }
          principals.set(client, p);
          done(null, true);
        })
        .catch((e: Error) => {
          const err = new Error(e.message) as AuthenticateError;
          err.returnCode = 3 as AuthenticateError['returnCode']; // SERVER_UNAVAILABLE: the credential store could not be read
          done(err, false);
        });
    },
    authorizePublish: (client, packet, done) => {
      if (!client) return done(null); // broker-internal publish (in-process services, wills)
      const p = principals.get(client);
      if (p?.kind === 'service') return done(null);
      if (p?.kind === 'unit' && packet.topic.startsWith(opts.unitPrefix(p.serial))) return done(null);
      opts.onDenied?.(p, packet.topic);
      done(new Error(`publish outside own prefix: ${packet.topic}`));
    },
    authorizeSubscribe: (client, sub, done) => {
      const p = client ? principals.get(client) : undefined;
      if (p?.kind === 'service') return done(null, sub);
      if (p?.kind === 'unit' && sub.topic.startsWith(opts.unitPrefix(p.serial)) && !sub.topic.includes('+') && !sub.topic.includes('#')) return done(null, sub);
      done(null, null); // a null subscription answers SUBACK 0x80 (failure) and keeps the client connected
    },
  });
  if (opts.onClientGone) {
    aedes.on('clientDisconnect', (client) => {
      const p = principals.get(client);
      if (p) opts.onClientGone!(p, client.id);
    });
  }
  const server: Server = createServer(aedes.handle as (s: import('node:net').Socket) => void);
  await new Promise<void>((res, rej) => {
    server.once('error', rej);
    server.listen(opts.port, opts.host, () => res());
  });
  return {
    aedes,
    port: (server.address() as AddressInfo).port,
    clients: () => aedes.connectedClients,
    close: async () => {
      await new Promise<void>((res) => aedes.close(() => res()));
      await new Promise<void>((res) => server.close(() => res()));
    },
  };
}

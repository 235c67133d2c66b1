import { createServer, connect, type Server, type Socket } from 'node:net';
import type { AddressInfo } from 'node:net';

/** A loopback TCP proxy a test can cut and restore, to stage a real database outage. */
export async function startTcpProxy(
  targetPort: number,
  listenPort = 0,
): Promise<{ port: number; cut(): Promise<void>; restore(): Promise<void>; close(): Promise<void> }> {
  const sockets = new Set<Socket>();
  let server: Server;
  let port = listenPort;
  const listen = () =>
    new Promise<void>((res, rej) => {
      server = createServer((client) => {
        const upstream = connect(targetPort, '127.0.0.1');
        sockets.add(client);
        sockets.add(upstream);
        client.pipe(upstream).pipe(client);
        const drop = () => {
          client.destroy();
          upstream.destroy();
          sockets.delete(client);
          sockets.delete(upstream);
        };
        client.on('error', drop).on('close', drop);
        upstream.on('error', drop).on('close', drop);
      });
      server.once('error', rej);
      server.listen(port, '127.0.0.1', () => {
        port = (server.address() as AddressInfo).port;
        res();
      });
    });
  const stop = () =>
    new Promise<void>((res) => {
      for (const s of sockets) s.destroy();
      sockets.clear();
      server.close(() => res());
    });
  await listen();
  return {
    get port() {
      return port;
    },
    cut: stop,
    restore: listen,
    close: stop,
  };
}

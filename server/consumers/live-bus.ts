import { connect, type NatsConnection } from 'nats';
import type { Logger } from 'pino';
import type { LiveBus } from '../services/live-relay';

/**
 * A server's core NATS connection to the message engine for the workers' live events. It connects in the background
 * and keeps retrying, so a server whose engine is not up yet still starts (its dashboards show live state from the
 * moment the engine answers). `onOpen` runs once connected.
 */
export function openLiveBus(
  opts: { urls: string[]; user: string; password: string },
  log: Logger,
  onOpen: (bus: LiveBus) => void,
): { close(): Promise<void> } {
  let nc: NatsConnection | undefined;
  let closed = false;
  void connect({
    servers: opts.urls,
    user: opts.user,
    pass: opts.password,
    name: 'brightward-server-live',
    waitOnFirstConnect: true,
    maxReconnectAttempts: -1,
    reconnectTimeWait: 500,
  }).then(
    (c) => {
      nc = c;
      if (closed) return void c.close();
      onOpen({
        publish: (subject, data) => c.publish(subject, data),
        subscribe: (subject, onMessage) =>
          c.subscribe(subject, {
            callback: (err, msg) => void (err ? log.warn({ err }, 'live subscription failed') : onMessage(msg.data)),
          }),
      });
    },
    (err: unknown) => log.error({ err }, 'cannot reach the message engine for live events'),
  );
  return {
    close: async () => {
      closed = true;
      await nc?.close().catch(() => undefined);
    },
  };
}

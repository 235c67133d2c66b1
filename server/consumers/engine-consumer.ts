import { AckPolicy, DeliverPolicy, RetentionPolicy, StorageType, connect, nanos, type ConsumerMessages, type NatsConnection } from 'nats';
import type { LiveBus } from '../services/live-relay';
import type { Logger } from 'pino';
import type { Acknowledge } from '../services/ingest-service';

/** The engine's stream of the units' partitioned readings (subjects `bw.s.<partition>.v1.units.<serial>.<leaf>`). */
export const READINGS_STREAM = 'BW_READINGS';
const SUBJECT = /^bw\.s\.(\d+)\.v1\.units\.([^.]+)\.([a-z]+)$/;

export interface EngineConsumerOptions {
  urls: string[];
  user: string;
  password: string;
  /** Copies of each reading the stream keeps (≤ engine nodes). */
  replicas: number;
  /** Readings handed out to a worker and not yet acknowledged, per partition (its ingest batches them). */
  maxInFlight: number;
  /** A reading not acknowledged within this long is handed out again [ms]. */
  ackWaitMs: number;
}

export const DEFAULT_ENGINE_CONSUMER_OPTIONS: Omit<EngineConsumerOptions, 'urls' | 'user' | 'password'> = {
  replicas: 1,
  maxInFlight: 4000,
  ackWaitMs: 30_000,
};

/**
 * The ingest workers' entry point (like mqtt-consumer.ts for the built-in broker): takes one partition's readings from
 * the engine's JetStream stream through a durable pull consumer and hands each to the ingest, acknowledging it to the
 * engine only once the ingest acknowledges it — after the MariaDB commit of its batch. A reading the ingest refuses
 * (bad payload, unknown unit) is acknowledged too, as the built-in broker does, so it is not handed out forever; one
 * whose batch failed is handed out again (`nak`), and `INSERT IGNORE` on (unit, time) makes a second delivery
 * harmless. The stream is a work queue: an acknowledged reading is removed from the engine.
 */
export class EngineConsumer {
  private nc: NatsConnection | undefined;
  private readonly running = new Map<number, { messages: ConsumerMessages; done: Promise<void> }>();
  private readonly opts: EngineConsumerOptions;

  constructor(
    private readonly receive: (serial: string, leaf: string, payload: Buffer, ack: Acknowledge) => void,
    private readonly log: Logger,
    opts: Pick<EngineConsumerOptions, 'urls' | 'user' | 'password'> & Partial<EngineConsumerOptions>,
  ) {
    this.opts = { ...DEFAULT_ENGINE_CONSUMER_OPTIONS, ...opts };
  }

  /** Connects and makes sure the stream exists (every worker may: the same settings each time). */
  async open(): Promise<void> {
    this.nc = await connect({
      servers: this.opts.urls,
      user: this.opts.user,
      pass: this.opts.password,
      name: 'brightward-worker',
      maxReconnectAttempts: -1,
      reconnectTimeWait: 500,
    });
    const jsm = await this.nc.jetstreamManager();
    const config = {
      name: READINGS_STREAM,
      subjects: ['bw.s.>'],
      retention: RetentionPolicy.Workqueue,
      storage: StorageType.File,
      num_replicas: this.opts.replicas,
    };
    try {
      await jsm.streams.info(READINGS_STREAM);
    } catch {
      await jsm.streams.add(config).catch(async (err: unknown) => {
        // Another worker made it in the meantime.
        if (!(await jsm.streams.info(READINGS_STREAM).catch(() => null))) throw err;
      });
    }
  }

  /** Starts taking the partition's readings (the durable consumer `partition-<p>` keeps its place across workers). */
  async start(partition: number): Promise<void> {
    if (this.running.has(partition)) return;
    const nc = this.nc!;
    const jsm = await nc.jetstreamManager();
    const name = `partition-${partition}`;
    await jsm.consumers
      .add(READINGS_STREAM, {
        durable_name: name,
        filter_subject: `bw.s.${partition}.>`,
        ack_policy: AckPolicy.Explicit,
        deliver_policy: DeliverPolicy.All,
        ack_wait: nanos(this.opts.ackWaitMs),
        max_ack_pending: this.opts.maxInFlight,
      })
      .catch(async (err: unknown) => {
        if (!(await jsm.consumers.info(READINGS_STREAM, name).catch(() => null))) throw err;
      });
    const consumer = await nc.jetstream().consumers.get(READINGS_STREAM, name);
    const messages = await consumer.consume({ max_messages: Math.min(1000, this.opts.maxInFlight) });
    const done = (async () => {
      for await (const m of messages) {
        const parts = SUBJECT.exec(m.subject);
        if (!parts || Number(parts[1]) !== partition) {
          this.log.warn({ subject: m.subject, partition }, 'reading on an unexpected subject dropped');
          m.ack();
          continue;
        }
        this.receive(parts[2]!, parts[3]!, Buffer.from(m.data), (err) => (err ? m.nak(1000) : m.ack()));
      }
    })().catch((err) => this.log.error({ err, partition }, 'engine consumer stopped'));
    this.running.set(partition, { messages, done });
    this.log.info({ partition }, 'taking readings of partition');
  }

  /** Stops taking the partition's readings; those already handed to the ingest are still acknowledged after their commit. */
  async stop(partition: number): Promise<void> {
    const r = this.running.get(partition);
    if (!r) return;
    this.running.delete(partition);
    r.messages.stop();
    await r.done;
    this.log.info({ partition }, 'no longer taking readings of partition');
  }

  /**
   * Core NATS on the same connection, for the live relay: a publish before `open` or while reconnecting is dropped
   * (live state is at most once; the next report repairs it).
   */
  bus(): LiveBus {
    return {
      publish: (subject, data) => {
        if (this.nc && !this.nc.isClosed()) this.nc.publish(subject, data);
      },
      subscribe: (subject, onMessage) => {
        if (!this.nc) throw new Error('the engine consumer is not open');
        return this.nc.subscribe(subject, {
          callback: (err, msg) => void (err ? this.log.warn({ err }, 'live subscription failed') : onMessage(msg.data)),
        });
      },
    };
  }

  async close(): Promise<void> {
    for (const p of [...this.running.keys()]) await this.stop(p);
    await this.nc?.drain().catch(() => undefined);
  }
}

import { isIP } from 'node:net';
import { z } from 'zod';

/** Proxies whose X-Forwarded-For/-Proto Express believes: none (`false`), a hop count, or named addresses/ranges. */
export type TrustProxy = false | number | string[];

const PROXY_NAMES = new Set(['loopback', 'linklocal', 'uniquelocal']);
const isAddressOrRange = (s: string) => {
  const [ip, bits, ...rest] = s.split('/');
  if (rest.length || !ip || !isIP(ip)) return false;
  return bits === undefined || (/^\d{1,3}$/.test(bits) && Number(bits) <= (isIP(ip) === 4 ? 32 : 128));
};

const trustProxy = z
  .string()
  .trim()
  .default('off')
  .transform((v, ctx): TrustProxy => {
    if (v === '' || v === 'off' || v === 'false') return false;
    if (/^\d{1,2}$/.test(v)) return Number(v) || false;
    const parts = v
      .split(',')
      .map((p) => p.trim())
      .filter(Boolean);
    const bad = parts.filter((p) => !PROXY_NAMES.has(p) && !isAddressOrRange(p));
    if (bad.length || !parts.length) {
      ctx.addIssue({
        code: 'custom',
        message: `off, a hop count, or a comma list of loopback, linklocal, uniquelocal, IP addresses or CIDR ranges (not ${bad.join(', ') || 'empty'})`,
      });
      return z.NEVER;
    }
    return parts;
  });

const allowedOrigins = z
  .string()
  .default('')
  .transform((v, ctx): string[] => {
    const out: string[] = [];
    for (const raw of v
      .split(',')
      .map((p) => p.trim())
      .filter(Boolean)) {
      let url: URL | undefined;
      try {
        url = new URL(raw);
      } catch {
        url = undefined;
      }
      if (!url || (url.protocol !== 'http:' && url.protocol !== 'https:') || url.origin !== raw.toLowerCase().replace(/\/$/, '')) {
        ctx.addIssue({ code: 'custom', message: `origins like https://ops.example.org, comma-separated, without path (not ${raw})` });
        return z.NEVER;
      }
      out.push(url.origin);
    }
    return out;
  });

const tcpPort = z.coerce
  .number({ error: 'a TCP port, a whole number from 1 to 65535' })
  .int('a TCP port, a whole number from 1 to 65535')
  .min(1, 'a TCP port, a whole number from 1 to 65535')
  .max(65535, 'a TCP port, a whole number from 1 to 65535');

const onOff = z.enum(['true', 'false', 'on', 'off', '1', '0'], 'true or false').transform((v) => v === 'true' || v === 'on' || v === '1');

/** `name@host` or `Display Name <name@host>`. */
const mailFrom = z
  .string()
  .trim()
  .regex(/^(?:[^<>@]*<[^<>@\s]+@[^<>@\s]+>|[^<>@\s]+@[^<>@\s]+)$/, 'an address such as Brightward <ops@example.org>');

const zones = new Set([...Intl.supportedValuesOf('timeZone'), 'UTC']);

/** Runtime settings, read once from the environment and validated at start-up. Defaults are documented in README. */
const envSchema = z.object({
  BW_HOST: z.string().default('127.0.0.1'),
  BW_PORT: z.coerce.number().int().min(0).max(65535).default(4300),
  BW_DB_HOST: z.string().default('127.0.0.1'),
  BW_DB_PORT: z.coerce.number().int().min(1).max(65535).default(3307),
  BW_DB_NAME: z
    .string()
    .regex(/^[A-Za-z0-9_]+$/, 'letters, digits and _ only')
    .default('brightward'),
  BW_DB_USER: z.string().min(1).default('brightward'),
  BW_DB_PASSWORD: z.string().default('brightward-local'),
  BW_DB_POOL_MAX: z.coerce.number().int().min(1).max(64).default(6),
  BW_BROKER_HOST: z.string().default('127.0.0.1'),
  BW_BROKER_PORT: z.coerce.number().int().min(0).max(65535).default(1884),
  // MQTT over TLS is off unless a port is given ('' or 'off' also mean off).
  BW_BROKER_TLS_PORT: z.preprocess((v) => (v === '' || v === 'off' ? undefined : v), z.coerce.number().int().min(0).max(65535).optional()),
  BW_BROKER_CONNECT_TIMEOUT_MS: z.coerce.number().int().min(100).max(600_000).default(10_000),
  BW_BROKER_TLS_CERT: z.string().min(1).optional(),
  BW_BROKER_TLS_KEY: z.string().min(1).optional(),
  BW_SESSION_SECRET: z.string().min(32, 'at least 32 characters').optional(),
  BW_SESSION_HOURS: z.coerce
    .number()
    .min(0.1)
    .max(24 * 30)
    .default(12),
  BW_WEB_DIR: z.string().default('dist/web/browser'),
  BW_LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  BW_SIGNIN_LIMIT_PER_MIN: z.coerce.number().int().min(1).default(10),
  BW_RAW_RETENTION_DAYS: z.coerce.number().int().min(1).max(36500).default(400),
  BW_INGEST_BATCH_ROWS: z.coerce.number().int().min(1).max(20000).default(1000),
  // A unit's PUBACK waits for its batch to commit, so this bounds the added acknowledgement latency at low rates.
  BW_INGEST_FLUSH_MS: z.coerce.number().int().min(1).max(60000).default(50),
  BW_INGEST_MAX_BUFFER_ROWS: z.coerce.number().int().min(1000).default(200000),
  BW_INGEST_CONCURRENCY: z.coerce.number().int().min(1).max(16).default(2),
  BW_BCRYPT_COST: z.coerce.number().int().min(4).max(15).default(10),
  BW_TRUST_PROXY: trustProxy,
  BW_ALLOWED_ORIGINS: allowedOrigins,
  // Ticket files through the S3 API: a bucket (BW_S3_BUCKET, endpoint optional for AWS itself), else the local store.
  BW_S3_ENDPOINT: z.url({ protocol: /^https?$/, error: 'an http(s) URL such as https://s3.example.org' }).optional(),
  BW_S3_BUCKET: z
    .string()
    .regex(/^[a-z0-9][a-z0-9.-]{1,61}[a-z0-9]$/, '3 to 63 lower-case letters, digits, dots and hyphens (an S3 bucket name)')
    .optional(),
  BW_S3_REGION: z.string().min(1).default('us-east-1'),
  BW_S3_ACCESS_KEY_ID: z.string().min(1).optional(),
  BW_S3_SECRET_ACCESS_KEY: z.string().min(1).optional(),
  BW_S3_FORCE_PATH_STYLE: z.enum(['true', 'false'], 'true or false').default('true'),
  BW_S3_LOCAL_DIR: z.string().min(1).default('.data/s3'),
  // Outgoing mail. The defaults reach the local mail service `npm start` runs (server/scripts/mail-sink.ts).
  BW_SMTP_HOST: z.string().trim().min(1, 'a host name or address').default('127.0.0.1'),
  BW_SMTP_PORT: tcpPort.default(2525),
  BW_SMTP_SECURE: onOff.default(false),
  BW_SMTP_USER: z.string().min(1).optional(),
  BW_SMTP_PASSWORD: z.string().min(1).optional(),
  BW_SMTP_FROM: mailFrom.default('Brightward <brightward@localhost>'),
  BW_MAIL_ATTEMPTS: z.coerce.number().int().min(1, 'at least 1').max(10, 'at most 10').default(4),
  BW_DIGEST_HOUR: z.coerce.number().int().min(0, 'an hour from 0 to 23').max(23, 'an hour from 0 to 23').default(7),
  BW_DIGEST_TIME_ZONE: z
    .string()
    .refine((v) => zones.has(v), 'an IANA time zone such as Europe/Berlin')
    .default('UTC'),
  // The external message engine's folder (server/scripts/engine.sh): the server keeps the units' engine users there.
  BW_ENGINE_DIR: z.string().min(1).optional(),
  BW_ENGINE_USER: z
    .string()
    .regex(/^[a-z][a-z0-9-]{2,31}$/, 'lower-case letters, digits and - (not a unit serial)')
    .default('bw-service'),
  BW_ENGINE_PASSWORD: z.string().min(16, 'at least 16 characters').optional(),
  // Ingest workers: how many partitions the engine splits the units' readings into (by site), and where its MQTT gateway is.
  BW_ENGINE_PARTITIONS: z.coerce.number().int().min(1).max(64).default(2),
  BW_ENGINE_URLS: z
    .string()
    .default('nats://127.0.0.1:4222')
    .refine((v) => v.split(',').every((u) => /^nats:\/\/[^/\s]+:\d+$/.test(u.trim())), 'comma list of nats://host:port'),
  // How many copies of each reading the engine keeps (its JetStream stream; at most the number of engine nodes).
  BW_ENGINE_REPLICAS: z.coerce.number().int().min(1).max(5).default(1),
  // Several servers on one database: what each hears goes through the database to the one running the comms watch.
  BW_CLUSTER: onOff.default(false),
  BW_PUBLIC_URL: z.url({ protocol: /^https?$/, error: 'the dashboard address, such as https://ops.example.org' }).optional(),
});

/**
 * Where ticket files go: a bucket reached through the S3 API, or (no BW_S3_BUCKET) the local S3-compatible store the
 * server starts itself on loopback with its data in `directory` (development, `npm start`, tests).
 */
export type FileStoreConfig =
  | { kind: 'local'; directory: string }
  | {
      kind: 's3';
      /** Omitted for AWS itself (the endpoint follows from the region). */
      endpoint?: string;
      bucket: string;
      region: string;
      forcePathStyle: boolean;
      /** Omitted: the SDK's own chain (environment, instance role). */
      credentials?: { accessKeyId: string; secretAccessKey: string };
    };

export interface Config {
  host: string;
  port: number;
  db: { host: string; port: number; database: string; user: string; password: string; poolMax: number };
  /** `tls` when MQTT over TLS is offered; without cert/key paths a development certificate is made in `.data/tls/`. */
  broker: { host: string; port: number; connectTimeoutMs?: number; tls?: { port: number; certPath?: string; keyPath?: string } };
  /** HMAC secret of session tokens; when unset a random one is made per process (sessions end on restart). */
  sessionSecret: string | undefined;
  sessionHours: number;
  webDir: string;
  logLevel: z.infer<typeof envSchema>['BW_LOG_LEVEL'];
  signInLimitPerMinute: number;
  bcryptCost: number;
  /** Proxies in front of the server whose forwarded client address and scheme are believed; none by default. */
  trustProxy: TrustProxy;
  /** Origins besides the server's own that may send state-changing requests and open the live socket. */
  allowedOrigins: string[];
  ingest: { retentionDays: number; batchRows: number; flushMs: number; maxBufferRows: number; flushConcurrency: number };
  files: FileStoreConfig;
  /** The SMTP server mail goes to, the sender, and how many times a message is tried before it counts as failed. */
  mail: MailConfig;
  /** The daily digest's local hour and zone; the dashboard address links in mails point to (when known). */
  notifications: { digestHour: number; digestTimeZone: string; publicUrl?: string };
  /** Several servers share the database (and a session secret): units' last-heard times are shared for the comms watch. */
  cluster: boolean;
  /**
   * The external message engine (unset: none): its folder where the server keeps the units' users (servers only), the
   * service user servers and workers connect as, the worker partitions, its client addresses and copies per reading.
   */
  engine?: { dir?: string; service: { user: string; password: string }; partitions: number; urls: string[]; replicas: number };
}

export interface MailConfig {
  host: string;
  port: number;
  /** TLS from the first byte (port 465 style); otherwise STARTTLS when the server offers it. */
  secure: boolean;
  auth?: { user: string; pass: string };
  from: string;
  attempts: number;
}

export class ConfigError extends Error {}

export function loadConfig(env: Record<string, string | undefined> = process.env): Config {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
    throw new ConfigError(`Invalid configuration:\n  ${lines.join('\n  ')}`);
  }
  const e = parsed.data;
  const tlsProblem =
    (e.BW_BROKER_TLS_CERT === undefined) !== (e.BW_BROKER_TLS_KEY === undefined)
      ? 'BW_BROKER_TLS_CERT and BW_BROKER_TLS_KEY: give both or neither'
      : e.BW_BROKER_TLS_CERT !== undefined && e.BW_BROKER_TLS_PORT === undefined
        ? 'BW_BROKER_TLS_PORT: required when BW_BROKER_TLS_CERT/BW_BROKER_TLS_KEY are set'
        : null;
  if (!tlsProblem && (e.BW_SMTP_USER === undefined) !== (e.BW_SMTP_PASSWORD === undefined))
    throw new ConfigError('Invalid configuration:\n  BW_SMTP_USER and BW_SMTP_PASSWORD: give both or neither');
  if (tlsProblem) throw new ConfigError(`Invalid configuration:\n  ${tlsProblem}`);
  const s3Problem =
    (e.BW_S3_ACCESS_KEY_ID === undefined) !== (e.BW_S3_SECRET_ACCESS_KEY === undefined)
      ? 'BW_S3_ACCESS_KEY_ID and BW_S3_SECRET_ACCESS_KEY: give both or neither'
      : e.BW_S3_BUCKET === undefined && (e.BW_S3_ENDPOINT !== undefined || e.BW_S3_ACCESS_KEY_ID !== undefined)
        ? 'BW_S3_BUCKET: required with BW_S3_ENDPOINT or S3 credentials (without all three, files go to the local store)'
        : null;
  if (s3Problem) throw new ConfigError(`Invalid configuration:\n  ${s3Problem}`);
  if (e.BW_ENGINE_DIR !== undefined && e.BW_ENGINE_PASSWORD === undefined)
    throw new ConfigError(
      'Invalid configuration:\n  BW_ENGINE_PASSWORD: required with BW_ENGINE_DIR (the service user of the message engine)',
    );
  if (e.BW_CLUSTER && e.BW_SESSION_SECRET === undefined)
    throw new ConfigError(
      'Invalid configuration:\n  BW_SESSION_SECRET: required with BW_CLUSTER (every server must accept the sessions the others sign)',
    );
  return {
    host: e.BW_HOST,
    port: e.BW_PORT,
    db: {
      host: e.BW_DB_HOST,
      port: e.BW_DB_PORT,
      database: e.BW_DB_NAME,
      user: e.BW_DB_USER,
      password: e.BW_DB_PASSWORD,
      poolMax: e.BW_DB_POOL_MAX,
    },
    broker: {
      host: e.BW_BROKER_HOST,
      port: e.BW_BROKER_PORT,
      connectTimeoutMs: e.BW_BROKER_CONNECT_TIMEOUT_MS,
      ...(e.BW_BROKER_TLS_PORT === undefined
        ? {}
        : { tls: { port: e.BW_BROKER_TLS_PORT, certPath: e.BW_BROKER_TLS_CERT, keyPath: e.BW_BROKER_TLS_KEY } }),
    },
    sessionSecret: e.BW_SESSION_SECRET,
    sessionHours: e.BW_SESSION_HOURS,
    webDir: e.BW_WEB_DIR,
    logLevel: e.BW_LOG_LEVEL,
    signInLimitPerMinute: e.BW_SIGNIN_LIMIT_PER_MIN,
    bcryptCost: e.BW_BCRYPT_COST,
    trustProxy: e.BW_TRUST_PROXY,
    allowedOrigins: e.BW_ALLOWED_ORIGINS,
    ingest: {
      retentionDays: e.BW_RAW_RETENTION_DAYS,
      batchRows: e.BW_INGEST_BATCH_ROWS,
      flushMs: e.BW_INGEST_FLUSH_MS,
      maxBufferRows: e.BW_INGEST_MAX_BUFFER_ROWS,
      flushConcurrency: e.BW_INGEST_CONCURRENCY,
    },
    files:
      e.BW_S3_BUCKET === undefined
        ? { kind: 'local', directory: e.BW_S3_LOCAL_DIR }
        : {
            kind: 's3',
            ...(e.BW_S3_ENDPOINT ? { endpoint: e.BW_S3_ENDPOINT } : {}),
            bucket: e.BW_S3_BUCKET,
            region: e.BW_S3_REGION,
            forcePathStyle: e.BW_S3_FORCE_PATH_STYLE === 'true',
            ...(e.BW_S3_ACCESS_KEY_ID && e.BW_S3_SECRET_ACCESS_KEY
              ? { credentials: { accessKeyId: e.BW_S3_ACCESS_KEY_ID, secretAccessKey: e.BW_S3_SECRET_ACCESS_KEY } }
              : {}),
          },
    mail: {
      host: e.BW_SMTP_HOST,
      port: e.BW_SMTP_PORT,
      secure: e.BW_SMTP_SECURE,
      ...(e.BW_SMTP_USER !== undefined && e.BW_SMTP_PASSWORD !== undefined
        ? { auth: { user: e.BW_SMTP_USER, pass: e.BW_SMTP_PASSWORD } }
        : {}),
      from: e.BW_SMTP_FROM,
      attempts: e.BW_MAIL_ATTEMPTS,
    },
    notifications: {
      digestHour: e.BW_DIGEST_HOUR,
      digestTimeZone: e.BW_DIGEST_TIME_ZONE,
      ...(e.BW_PUBLIC_URL ? { publicUrl: e.BW_PUBLIC_URL.replace(/\/$/, '') } : {}),
    },
    cluster: e.BW_CLUSTER,
    ...(e.BW_ENGINE_PASSWORD !== undefined
      ? {
          engine: {
            ...(e.BW_ENGINE_DIR !== undefined ? { dir: e.BW_ENGINE_DIR } : {}),
            service: { user: e.BW_ENGINE_USER, password: e.BW_ENGINE_PASSWORD },
            partitions: e.BW_ENGINE_PARTITIONS,
            urls: e.BW_ENGINE_URLS.split(',').map((u) => u.trim()),
            replicas: e.BW_ENGINE_REPLICAS,
          },
        }
      : {}),
  };
}

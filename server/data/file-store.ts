import { mkdirSync } from 'node:fs';
import {
  DeleteObjectsCommand,
  GetObjectCommand,
  HeadBucketCommand,
  ListObjectsV2Command,
  NoSuchKey,
  PutObjectCommand,
  S3Client,
} from '@aws-sdk/client-s3';
import type { FileStoreConfig } from '../config';

// The pinned SDK runs on Node 20 (engines); its notice concerns later SDK versions and would print on every start.
process.env['AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED'] ??= 'true';

/** The bucket of the local store. */
export const LOCAL_BUCKET = 'brightward-files';
/** The local store's fixed key pair (it signs requests like S3 does; it listens on loopback only). */
const LOCAL_CREDENTIALS = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' };

/**
 * Object storage through the S3 API: a bucket named by BW_S3_* in production, or the local S3-compatible store
 * (s3rver) this process starts on loopback, on a free port, with its data under BW_S3_LOCAL_DIR. Either way the server
 * talks to it with the same client over HTTP, so development and tests take the production path.
 */
export class FileStore {
  private constructor(
    private readonly s3: S3Client,
    readonly bucket: string,
    /** Where it is, for logs and start-up errors. */
    readonly where: string,
    private readonly local: { close(): Promise<void> } | null,
  ) {}

  /** Opens the store: starts the local one, or checks that the bucket answers. Throws a message naming what failed. */
  static async open(cfg: FileStoreConfig): Promise<FileStore> {
    if (cfg.kind === 'local') {
      mkdirSync(cfg.directory, { recursive: true });
      const { default: S3rver } = await import('s3rver');
      const server = new S3rver({
        address: '127.0.0.1',
        port: 0,
        silent: true,
        directory: cfg.directory,
        configureBuckets: [{ name: LOCAL_BUCKET }],
      });
      const { port } = await server.run();
      const s3 = new S3Client({
        endpoint: `http://127.0.0.1:${port}`,
        region: 'us-east-1',
        forcePathStyle: true,
        credentials: LOCAL_CREDENTIALS,
      });
      return new FileStore(s3, LOCAL_BUCKET, `local store ${cfg.directory} (127.0.0.1:${port})`, server);
    }
    const s3 = new S3Client({
      ...(cfg.endpoint ? { endpoint: cfg.endpoint } : {}),
      region: cfg.region,
      forcePathStyle: cfg.forcePathStyle,
      ...(cfg.credentials ? { credentials: cfg.credentials } : {}),
    });
    const where = `bucket ${cfg.bucket} at ${cfg.endpoint ?? `AWS S3 ${cfg.region}`}`;
    try {
      await s3.send(new HeadBucketCommand({ Bucket: cfg.bucket }));
    } catch (err) {
      s3.destroy();
      const e = err as Error & { $metadata?: { httpStatusCode?: number } };
      const status = e.$metadata?.httpStatusCode;
      throw new Error(
        `the file store's ${where} does not answer (${status === 404 ? 'no such bucket' : status === 403 ? 'access denied' : status ? `HTTP ${status}` : e.message || e.name}); check BW_S3_ENDPOINT, BW_S3_BUCKET, BW_S3_REGION and the credentials`,
      );
    }
    return new FileStore(s3, cfg.bucket, where, null);
  }

  async put(key: string, bytes: Buffer, contentType: string): Promise<void> {
    await this.s3.send(new PutObjectCommand({ Bucket: this.bucket, Key: key, Body: bytes, ContentType: contentType }));
  }

  /** The object's bytes, or undefined when there is none under that key. */
  async get(key: string): Promise<Buffer | undefined> {
    try {
      const r = await this.s3.send(new GetObjectCommand({ Bucket: this.bucket, Key: key }));
      return Buffer.from(await r.Body!.transformToByteArray());
    } catch (err) {
      if (err instanceof NoSuchKey) return undefined;
      throw err;
    }
  }

  async delete(keys: string[]): Promise<void> {
    if (!keys.length) return;
    await this.s3.send(new DeleteObjectsCommand({ Bucket: this.bucket, Delete: { Objects: keys.map((Key) => ({ Key })), Quiet: true } }));
  }

  /** Every key in the bucket (tests, checks). */
  async keys(): Promise<string[]> {
    const out: string[] = [];
    let token: string | undefined;
    do {
      const r = await this.s3.send(new ListObjectsV2Command({ Bucket: this.bucket, ContinuationToken: token }));
      out.push(...(r.Contents ?? []).map((c) => c.Key!));
      token = r.IsTruncated ? r.NextContinuationToken : undefined;
    } while (token);
    return out;
  }

  async close(): Promise<void> {
    this.s3.destroy();
    await this.local?.close();
  }
}

import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import S3rver from 's3rver';
import { ConfigError, loadConfig } from '../../server/config';
import { FileStore } from '../../server/data/file-store';

describe('file store settings (BW_S3_*)', () => {
  it('uses the local store under .data/s3 when no bucket is set', () => {
    expect(loadConfig({}).files).toEqual({ kind: 'local', directory: '.data/s3' });
    expect(loadConfig({ BW_S3_LOCAL_DIR: '/var/tmp/bw-s3' }).files).toEqual({ kind: 'local', directory: '/var/tmp/bw-s3' });
  });

  it('reads a bucket with its endpoint, region, path style and key pair', () => {
    const env = {
      BW_S3_ENDPOINT: 'https://objects.example.org',
      BW_S3_BUCKET: 'bw-ticket-files',
      BW_S3_REGION: 'eu-central-1',
      BW_S3_ACCESS_KEY_ID: 'AKIDEXAMPLE',
      BW_S3_SECRET_ACCESS_KEY: 'not-a-real-secret',
      BW_S3_FORCE_PATH_STYLE: 'false',
    };
    expect(loadConfig(env).files).toEqual({
      kind: 's3',
      endpoint: 'https://objects.example.org',
      bucket: 'bw-ticket-files',
      region: 'eu-central-1',
      forcePathStyle: false,
      credentials: { accessKeyId: 'AKIDEXAMPLE', secretAccessKey: 'not-a-real-secret' },
    });
    // AWS itself: no endpoint, the SDK's own credential chain, path style by default.
    expect(loadConfig({ BW_S3_BUCKET: 'bw-ticket-files' }).files).toEqual({
      kind: 's3',
      bucket: 'bw-ticket-files',
      region: 'us-east-1',
      forcePathStyle: true,
    });
  });

  it.each([
    [{ BW_S3_ENDPOINT: 'https://objects.example.org' }, /BW_S3_BUCKET: required with BW_S3_ENDPOINT/],
    [{ BW_S3_BUCKET: 'b', BW_S3_ACCESS_KEY_ID: 'x' }, /BW_S3_BUCKET: 3 to 63 lower-case/],
    [{ BW_S3_BUCKET: 'bw-files', BW_S3_ACCESS_KEY_ID: 'x' }, /BW_S3_ACCESS_KEY_ID and BW_S3_SECRET_ACCESS_KEY: give both or neither/],
    [{ BW_S3_BUCKET: 'Ticket_Files' }, /BW_S3_BUCKET: 3 to 63 lower-case letters/],
    [{ BW_S3_BUCKET: 'bw-files', BW_S3_ENDPOINT: 'ftp://objects.example.org' }, /BW_S3_ENDPOINT: an http\(s\) URL/],
    [{ BW_S3_BUCKET: 'bw-files', BW_S3_FORCE_PATH_STYLE: 'yes' }, /BW_S3_FORCE_PATH_STYLE: true or false/],
  ])('refuses %j at start-up, naming the setting', (env, message) => {
    expect(() => loadConfig(env)).toThrow(ConfigError);
    expect(() => loadConfig(env)).toThrow(message);
  });
});

describe('a bucket through the S3 API', () => {
  let server: S3rver;
  let endpoint: string;
  const dir = mkdtempSync(join(tmpdir(), 'bw-file-store-'));
  beforeAll(async () => {
    server = new S3rver({ address: '127.0.0.1', port: 0, silent: true, directory: dir, configureBuckets: [{ name: 'bw-ticket-files' }] });
    endpoint = `http://127.0.0.1:${(await server.run()).port}`;
  });
  afterAll(async () => {
    await server?.close();
    rmSync(dir, { recursive: true, force: true });
  });
  const credentials = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' };

  it('checks at start-up that the bucket answers, and names it when it does not', async () => {
    await expect(
      FileStore.open({ kind: 's3', endpoint, bucket: 'no-such-bucket', region: 'us-east-1', forcePathStyle: true, credentials }),
    ).rejects.toThrow(`the file store's bucket no-such-bucket at ${endpoint} does not answer (no such bucket)`);
  });

  it('puts, gets, lists and deletes objects', async () => {
    const store = await FileStore.open({
      kind: 's3',
      endpoint,
      bucket: 'bw-ticket-files',
      region: 'us-east-1',
      forcePathStyle: true,
      credentials,
    });
    try {
      await store.put('files/a', Buffer.from('evidence'), 'application/pdf');
      expect((await store.get('files/a'))?.toString()).toBe('evidence');
      expect(await store.get('files/missing')).toBeUndefined();
      expect(await store.keys()).toEqual(['files/a']);
      await store.delete(['files/a']);
      expect(await store.keys()).toEqual([]);
    } finally {
      await store.close();
    }
  });
});

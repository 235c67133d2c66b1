import { describe, expect, it } from 'vitest';
import { pino } from 'pino';
import { IngestService } from '../../server/services/ingest-service';
import { telemetryKey, type Added, type TelemetryRepository, type TelemetryRow } from '../../server/data/telemetry-repository';
import { directoryOf, unitInfo } from '../helpers/live-fixtures';
import { sample, waitFor } from '../helpers/fake-unit';

const unit = { ...unitInfo(7, 1, 1), serial: 'T-0007' };
const directory = directoryOf([unit]);

/** What an insert reports when it added the rows of these keys (listed: the repository may also say "all" with null). */
const addedOf = (keys: string[]): Added => ({ count: keys.length, keys: new Set(keys) });

/** A repository whose commits the test releases one by one, in any order; it remembers stored keys like the primary key would. */
function heldRepository() {
  const stored = new Set<string>();
  const pending: { rows: TelemetryRow[]; commit: () => void; fail: (err: Error) => void }[] = [];
  const repo = {
    insertTelemetry: (rows: TelemetryRow[]) =>
      new Promise<Added>((res, rej) => {
        pending.push({
          rows,
          commit: () => res(addedOf(rows.map((r) => telemetryKey(r.unit_id, r.ts)).filter((k) => !stored.has(k) && (stored.add(k), true)))),
          fail: rej,
        });
      }),
    insertEvents: async () => addedOf([]),
    insertWeather: async () => addedOf([]),
  } as unknown as TelemetryRepository;
  return { repo, pending };
}

const T0 = Date.now() - 600_000;
const body = (seq: number) => Buffer.from(JSON.stringify(sample(seq, T0 + seq * 1000)));

describe('ingest acknowledgement and announcements', () => {
  it('acknowledges a reading only when its batch commits, and never a refused one late', async () => {
    const { repo, pending } = heldRepository();
    const ingest = new IngestService(repo, directory, pino({ level: 'silent' }), {}, { batchRows: 2, flushMs: 5, flushConcurrency: 2 });
    const acked: string[] = [];
    ingest.receive(unit.serial, 'telemetry', body(1), () => acked.push('1'));
    ingest.receive(unit.serial, 'telemetry', Buffer.from('{oops'), () => acked.push('bad'));
    ingest.receive(unit.serial, 'telemetry', body(2), () => acked.push('2'));
    expect(acked).toEqual(['bad']);
    await waitFor(() => pending.length === 1, 1000, 'the batch');
    pending[0]!.commit();
    await waitFor(() => acked.length === 3, 1000, 'acknowledgements');
    expect(acked).toEqual(['bad', '1', '2']);
    ingest.stop();
  });

  it('announces batches in the order they were taken, even when a later one commits first', async () => {
    const { repo, pending } = heldRepository();
    const heard: number[] = [];
    const ingest = new IngestService(
      repo,
      directory,
      pino({ level: 'silent' }),
      { stored: (_u, t) => heard.push(t.seq) },
      { batchRows: 2, flushMs: 5, flushConcurrency: 2 },
    );
    for (const seq of [1, 2, 3, 4]) ingest.receive(unit.serial, 'telemetry', body(seq));
    await waitFor(() => pending.length === 2, 1000, 'two batches in flight');
    pending[1]!.commit();
    await new Promise((r) => setTimeout(r, 20));
    expect(heard).toEqual([]);
    pending[0]!.commit();
    await waitFor(() => heard.length === 4, 1000, 'four readings heard');
    expect(heard).toEqual([1, 2, 3, 4]);
    ingest.stop();
  });

  it('announces a reading once when it and its resend share a batch, or the resend comes after it was stored', async () => {
    const { repo, pending } = heldRepository();
    const heard: number[] = [];
    const ingest = new IngestService(
      repo,
      directory,
      pino({ level: 'silent' }),
      { stored: (_u, t) => heard.push(t.seq) },
      { batchRows: 10, flushMs: 5, flushConcurrency: 1 },
    );
    let acks = 0;
    ingest.receive(unit.serial, 'telemetry', body(5), () => acks++);
    ingest.receive(unit.serial, 'telemetry', body(5), () => acks++);
    await waitFor(() => pending.length === 1, 1000, 'the batch');
    pending[0]!.commit();
    await waitFor(() => acks === 2, 1000, 'both acknowledged');
    ingest.receive(unit.serial, 'telemetry', body(5), () => acks++);
    await waitFor(() => pending.length === 2, 1000, 'the resend batch');
    pending[1]!.commit();
    await waitFor(() => acks === 3, 1000, 'the resend acknowledged');
    expect(heard).toEqual([5]);
    expect(ingest.counters.stored).toBe(1);
    expect(ingest.counters.duplicates).toBe(2);
    ingest.stop();
  });

  it('keeps a failed batch and acknowledges it only after the retry commits', async () => {
    const { repo, pending } = heldRepository();
    const ingest = new IngestService(repo, directory, pino({ level: 'silent' }), {}, { batchRows: 10, flushMs: 5, flushConcurrency: 1 });
    let acked = 0;
    ingest.receive(unit.serial, 'telemetry', body(9), () => acked++);
    await waitFor(() => pending.length === 1, 1000, 'the batch');
    pending[0]!.fail(Object.assign(new Error('gone'), { code: 'ECONNREFUSED' }));
    await waitFor(() => ingest.counters.flushFailures === 1, 1000, 'the failure');
    expect(acked).toBe(0);
    expect(ingest.bufferedRows).toBe(1);
    await waitFor(() => pending.length === 2, 5000, 'the retry');
    pending[1]!.commit();
    await waitFor(() => acked === 1, 1000, 'the acknowledgement');
    ingest.stop();
  });

  it('acknowledges the telemetry of a batch whose event insert failed, and retries only the event', async () => {
    const telemetryCalls: number[] = [];
    let eventCalls = 0;
    const repo = {
      insertTelemetry: async (rows: TelemetryRow[]) => {
        telemetryCalls.push(rows.length);
        return addedOf(rows.map((r) => telemetryKey(r.unit_id, r.ts)));
      },
      insertEvents: async (rows: unknown[]) => {
        if (rows.length && eventCalls++ === 0) throw Object.assign(new Error('gone'), { code: 'ECONNRESET' });
        return addedOf([]);
      },
      insertWeather: async () => addedOf([]),
    } as unknown as TelemetryRepository;
    const ingest = new IngestService(repo, directory, pino({ level: 'silent' }), {}, { batchRows: 10, flushMs: 5, flushConcurrency: 1 });
    const acked: string[] = [];
    ingest.receive(unit.serial, 'telemetry', body(1), () => acked.push('telemetry'));
    ingest.receive(unit.serial, 'events', Buffer.from(JSON.stringify({ v: 1, ts: new Date(T0).toISOString(), kind: 'boot' })), () =>
      acked.push('event'),
    );
    await waitFor(() => acked.length === 1, 1000, 'the telemetry acknowledgement');
    expect(acked).toEqual(['telemetry']);
    await waitFor(() => acked.length === 2, 5000, 'the event acknowledgement after the retry');
    expect(telemetryCalls.filter((n) => n > 0)).toEqual([1]);
    ingest.stop();
  });
});

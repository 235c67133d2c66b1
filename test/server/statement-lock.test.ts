/**
 * The monthly lock, restatements, late data, the PDF and the lock mail, with the lock job's clock injected. Two test
 * sites: "east" in Asia/Tokyo (UTC+9, Quillmoor) with data on 10 August, 10 September and 10 October 2026, and "west"
 * in America/Los_Angeles (UTC−8 in November, Fenwick Lane) with data on 10 October. A month locks on the 3rd of the
 * next month at 06:00 site time: October locks at 2026-11-02T21:00Z in Tokyo and 2026-11-03T14:00Z in Los Angeles.
 * Checksums are recomputed here independently: SHA-256 (FIPS 180-4, node:crypto) of the JSON with keys sorted.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createHash } from 'node:crypto';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { signedIn, type Agent } from '../helpers/signed-in';
import { startTestStack } from '../helpers/test-stack';
import { startLocalMailService, type LocalMailService, type ReceivedMail } from '../../server/mail/local-mail-service';
import { localMidnightUtcMs } from '../../shared/pv-performance';
import type { MonthlyStatement, StatementMonthList } from '../../shared/contracts/statements';

let nowMs = Date.parse('2026-11-02T20:59:00Z');
let sink: LocalMailService;
let stack: Awaited<ReturnType<typeof startTestStack>>;
const site = { east: 0, west: 0 };
const unitsOf: Record<'east' | 'west', number[]> = { east: [], west: [] };
const Q = 15 * 60_000;
const E_WH = 50; // energy of a daylight bucket [Wh]
/** 2025-09 … 2026-10. */
const EAST_MONTHS = Array.from({ length: 14 }, (_, i) => new Date(Date.UTC(2025, 8 + i, 1)).toISOString().slice(0, 7));
const tmp = mkdtempSync(join(tmpdir(), 'bw-lock-'));

const signIn = signedIn(() => stack.http);
const as = async (email: string): Promise<Agent> => (await signIn(email)).agent;
const OWNER = 'owner@quillmoor.example';
const OTHER_OWNER = 'owner@fenwicklane.example';
const ENGINEER = 'engineer@saltmarsh.example';
const TECH = 'tech1@saltmarsh.example';

/** A whole local day of 15-minute rows per unit: daylight 06:00–18:00 at 600 W/m² and E_WH per bucket. */
function dayRows(unitIds: number[], date: string, tz: string): Record<string, unknown>[] {
  const from = localMidnightUtcMs(date, tz);
  const rows: Record<string, unknown>[] = [];
  for (let b = from; b < from + 86_400_000; b += Q) {
    const h = (b - from) / 3600_000;
    const lit = h >= 6 && h < 18;
    for (const id of unitIds)
      rows.push({
        unit_id: id,
        bucket: new Date(b),
        minutes: 15,
        samples: 90,
        poa_avg_wm2: lit ? 600 : 0,
        poa_max_wm2: lit ? 600 : 0,
        dc_power_avg_w: lit ? E_WH * 4 : 0,
        energy_wh: lit ? E_WH : 0,
        module_temp_avg_c: lit ? 40 : 10,
        settled_min: 15,
        seeking_min: 0,
        scanning_min: 0,
        stowed_min: 0,
        held_min: 0,
        fault_min: 0,
      });
  }
  return rows;
}

/** JSON with sorted keys (written here, apart from the server's), hashed with SHA-256. */
function recomputedChecksum(s: MonthlyStatement): string {
  const { lock: _lock, ...content } = s;
  const sorted = (v: unknown): unknown =>
    Array.isArray(v)
      ? v.map(sorted)
      : v && typeof v === 'object'
        ? Object.fromEntries(
            Object.keys(v)
              .sort()
              .map((k) => [k, sorted((v as Record<string, unknown>)[k])]),
          )
        : v;
  return createHash('sha256')
    .update(JSON.stringify(sorted(content)))
    .digest('hex');
}

/** An audit detail as the driver returns it (a JSON column: text or already parsed). */
const json = (d: unknown) => (typeof d === 'string' ? JSON.parse(d) : d) as Record<string, unknown>;
const mailsTo = (address: string): ReceivedMail[] => sink.messages.filter((m) => m.to.includes(address));
/** The decoded bytes of the first application/pdf part of a raw MIME message. */
function pdfAttachment(raw: string): Buffer | null {
  const m = /Content-Type: application\/pdf[\s\S]*?\r?\n\r?\n([A-Za-z0-9+/=\r\n]+)/.exec(raw);
  return m ? Buffer.from(m[1]!.replace(/\s+/g, ''), 'base64') : null;
}
const pdfText = (pdf: Buffer, name: string) => {
  const file = join(tmp, name);
  writeFileSync(file, pdf);
  return execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
};

beforeAll(async () => {
  sink = await startLocalMailService();
  stack = await startTestStack({
    seed: true,
    env: { BW_SMTP_PORT: String(sink.port) },
    stack: { statements: { now: () => nowMs }, mail: { attempts: 2, backoffMs: () => 50 } },
  });
  const db = stack.db;
  const ownerId = async (name: string) => (await db('owners').where({ name }).first('id')).id as number;
  const addSite = async (name: string, owner: string, tz: string, lat: number, lon: number) =>
    (
      await db('sites').insert({
        owner_id: await ownerId(owner),
        name,
        latitude_deg: lat,
        longitude_deg: lon,
        elevation_m: 10,
        time_zone: tz,
      })
    )[0]!;
  site.east = await addSite('Lock test east roof', 'Quillmoor Energy Cooperative', 'Asia/Tokyo', 35.68, 139.69);
  site.west = await addSite('Lock test west yard', 'Fenwick Lane Schools Trust', 'America/Los_Angeles', 34.05, -118.24);
  for (const [k, n] of [
    ['east', 2],
    ['west', 1],
  ] as const)
    for (let i = 0; i < n; i++)
      unitsOf[k].push(
        (
          await db('units').insert({
            serial: `LCK-${k.toUpperCase()}-${i}`,
            site_id: site[k],
            rated_power_wp: 400,
            detector_tilt_deg: 10,
            firmware: 'test',
            device_secret_hash: 'sha256:00',
          })
        )[0]!,
      );
  await stack.units.load();
  const rows = [
    ...EAST_MONTHS.flatMap((m) => dayRows(unitsOf.east, `${m}-10`, 'Asia/Tokyo')),
    ...dayRows(unitsOf.west, '2026-10-10', 'America/Los_Angeles'),
  ];
  await db('telemetry_15m').insert(rows);
}, 60_000);
afterAll(async () => {
  await stack?.stop();
  await sink?.close();
  rmSync(tmp, { recursive: true, force: true });
});

const settle = async () => {
  await stack.statementLocks.settle();
  await stack.mail.settle();
};
const get = async (who: string, path: string) => (await (await as(who)).get(path).expect(200)).body as MonthlyStatement;

describe('the monthly lock', () => {
  it('on a fresh demo locks the past silently and mails only the newest due month', async () => {
    // The demo's seeding step (before the server starts): every due month but the newest, without mail.
    // The job looks back twelve due months (October 2025 … September 2026): September 2025 stays unlocked.
    const seeded = await stack.statementLocks.sweep({ leaveNewest: true });
    expect(seeded).toEqual(EAST_MONTHS.slice(1, 12).map((month) => ({ siteId: site.east, month, mailed: false })));
    // The server's first sweep: the newest due month (September in Tokyo; October is due only at 06:00 on 3 November).
    const first = await stack.statementLocks.sweep();
    await settle();
    expect(first).toEqual([{ siteId: site.east, month: '2026-09', mailed: true }]);
    const mails = mailsTo('accounts@quillmoor.example');
    expect(mails.map((m) => m.subject)).toEqual(['Monthly statement: Lock test east roof, 2026-09']);
    const rows = await stack.db('statements').where({ site_id: site.east }).orderBy('month').select('month', 'silent');
    expect(rows).toHaveLength(12); // the year of statements a fresh demo starts with
    expect(rows.filter((r) => !r.silent).map((r) => r.month)).toEqual(['2026-09']);
  });

  it('locks at 06:00 on the 3rd in the site zone: Tokyo (east of UTC) before Los Angeles (west)', async () => {
    nowMs = Date.parse('2026-11-02T20:59:59Z'); // 05:59:59 on 3 November in Tokyo
    expect(await stack.statementLocks.sweep()).toEqual([]);
    nowMs = Date.parse('2026-11-02T21:00:00Z'); // 06:00 in Tokyo; 13:00 on 2 November in Los Angeles
    expect(await stack.statementLocks.sweep()).toEqual([{ siteId: site.east, month: '2026-10', mailed: true }]);
    nowMs = Date.parse('2026-11-03T13:59:59Z'); // 05:59:59 PST on 3 November
    expect(await stack.statementLocks.sweep()).toEqual([]);
    nowMs = Date.parse('2026-11-03T14:00:00Z'); // 06:00 PST
    expect(await stack.statementLocks.sweep()).toEqual([{ siteId: site.west, month: '2026-10', mailed: true }]);
    expect(await stack.statementLocks.sweep()).toEqual([]); // once only
    await settle();
  });

  it('mails the locked statement with its PDF attached to the owner contact', async () => {
    const [oct] = mailsTo('estates@fenwicklane.example');
    expect(oct!.subject).toBe('Monthly statement: Lock test west yard, 2026-10');
    expect(oct!.raw).toMatch(/filename="?statement-site-\d+-2026-10\.pdf/);
    const pdf = pdfAttachment(oct!.raw)!;
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(pdfText(pdf, 'mailed.pdf')).toContain('Lock test west yard');
    expect(mailsTo('accounts@quillmoor.example').map((m) => m.subject)).toEqual([
      'Monthly statement: Lock test east roof, 2026-09',
      'Monthly statement: Lock test east roof, 2026-10',
    ]);
    const outbox = await stack.db('mail_outbox').where({ kind: 'statement' }).pluck('status');
    expect(outbox).toEqual(['sent', 'sent', 'sent']);
  });

  it('serves the locked content, says locked, version and checksum, and the checksum verifies', async () => {
    const s = await get(OWNER, `/api/sites/${site.east}/statements/2026-10`);
    expect(s.lock).toMatchObject({ version: 1, state: 'locked', lockedBy: null, reason: null, restatementSuggestedAt: null });
    expect(s.lock!.lockedAt).toBe('2026-11-02T21:00:00.000Z');
    expect(s.lock!.checksum).toMatch(/^[0-9a-f]{64}$/);
    expect(recomputedChecksum(s)).toBe(s.lock!.checksum);
    expect(s.site.energyKwh).toBeCloseTo((2 * 48 * E_WH) / 1000, 6);
    const list = (await (await as(OWNER)).get(`/api/sites/${site.east}/statements`).expect(200)).body as StatementMonthList;
    expect(list.months.filter((m) => m.locked).map((m) => m.month)).toEqual(EAST_MONTHS.slice(1).reverse());
    expect(list.months.find((m) => m.month === '2025-09')).toMatchObject({ locked: false, version: null });
  });
});

describe('the PDF', () => {
  it('opens and its text holds the site, owner, month, energy (DC) and PR; owners get their own sites only', async () => {
    const t0 = performance.now();
    const res = await (
      await as(OWNER)
    )
      .get(`/api/sites/${site.east}/statements/2026-10.pdf`)
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => cb(null, Buffer.concat(chunks)));
      });
    const ms = performance.now() - t0;
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    const s = await get(OWNER, `/api/sites/${site.east}/statements/2026-10`);
    const text = pdfText(res.body as Buffer, 'east.pdf');
    expect(text).toContain('Lock test east roof');
    expect(text).toContain('Quillmoor Energy Cooperative');
    expect(text).toContain('2026-10');
    expect(text).toContain('Asia/Tokyo');
    expect(text).toMatch(/Energy \(DC, as measured by the units\)\s+4\.8 kWh/);
    expect(text).toContain(s.site.pr!.toFixed(3));
    expect(text).toContain(s.lock!.checksum);
    expect(text).toMatch(/γ = -?\d+\.\d\d %\/K/);
    expect(text).toContain('lockout/tagout');
    expect(text).toContain('licensed practice');
    console.log(`[statement-lock] PDF of a month (2 units, 31 days) over HTTP: ${ms.toFixed(0)} ms`);
    await (await as(OTHER_OWNER)).get(`/api/sites/${site.east}/statements/2026-10.pdf`).expect(404);
    await request(stack.http).get(`/api/sites/${site.east}/statements/2026-10.pdf`).expect(401);
    const audit = await stack
      .db('audit_log')
      .where({ action: 'statement-export', target: `site:${site.east}` })
      .pluck('detail');
    expect(audit.map((d) => json(d).format)).toContain('pdf');
  });
});

describe('late data and restatements', () => {
  it('marks a locked month "restatement suggested" when a bucket of it is rolled up after the lock', async () => {
    const b = localMidnightUtcMs('2026-10-11', 'Asia/Tokyo') + 12 * 3600_000; // noon on 11 October in Tokyo
    const raw = Array.from({ length: 6 }, (_, i) => ({
      unit_id: unitsOf.east[0],
      ts: new Date(b + i * 10_000),
      seq: 900_000 + i,
      tilt_plus_wm2: 500,
      tilt_minus_wm2: 500,
      azimuth_plus_wm2: 500,
      azimuth_minus_wm2: 500,
      poa_wm2: 500,
      tilt_deg: 30,
      azimuth_deg: 180,
      cmd_tilt_deg: 30,
      cmd_azimuth_deg: 180,
      tilt_motor_a: 0,
      azimuth_motor_a: 0,
      dc_power_w: 200,
      module_temp_c: 30,
      mode: 'settled',
      received_at: new Date(nowMs),
    }));
    await stack.db('telemetry').insert(raw);
    stack.rollups.markStored(raw.map((r) => ({ unitId: unitsOf.east[0]!, tsMs: r.ts.getTime() })));
    await stack.rollups.runOnce();
    await settle();
    const s = await get(OWNER, `/api/sites/${site.east}/statements/2026-10`);
    expect(s.lock!.restatementSuggestedAt).toBe(new Date(nowMs).toISOString());
    expect(s.lock!.version).toBe(1); // the locked content stays as it was
    const list = (await (await as(OWNER)).get(`/api/sites/${site.east}/statements`).expect(200)).body as StatementMonthList;
    expect(list.months.find((m) => m.month === '2026-10')!.restatementSuggested).toBe(true);
    expect(list.months.find((m) => m.month === '2026-09')!.restatementSuggested).toBe(false);
  });

  it("suggests restating a site's locked months when its survey changes, and leaves their content alone", async () => {
    const engineer = await as(ENGINEER);
    const survey = (await engineer.get(`/api/sites/${site.west}/survey`).expect(200)).body;
    const before = (await (await as(ENGINEER)).get(`/api/sites/${site.west}/statements`).expect(200)).body as StatementMonthList;
    const locked = before.months.filter((m) => m.locked);
    expect(locked.length).toBeGreaterThan(0);
    expect(locked.some((m) => m.restatementSuggested)).toBe(false);
    const content = await get(ENGINEER, `/api/sites/${site.west}/statements/${locked[0]!.month}`);
    await engineer
      .put(`/api/sites/${site.west}/survey`)
      .send({ ...survey, horizon: [[0, 5]] })
      .expect(200);
    await settle();
    const after = (await engineer.get(`/api/sites/${site.west}/statements`).expect(200)).body as StatementMonthList;
    expect(after.months.filter((m) => m.locked).every((m) => m.restatementSuggested)).toBe(true);
    const again = await get(ENGINEER, `/api/sites/${site.west}/statements/${locked[0]!.month}`);
    expect(again.lock!.checksum).toBe(content.lock!.checksum);
  });

  it('lets engineers restate with a reason: a new version, the old one superseded and still readable', async () => {
    const before = await get(OWNER, `/api/sites/${site.east}/statements/2026-10`);
    await (await as(OWNER)).post(`/api/sites/${site.east}/statements/2026-10/restate`).send({ reason: 'Late data' }).expect(403);
    await (await as(TECH)).post(`/api/sites/${site.east}/statements/2026-10/restate`).send({ reason: 'Late data' }).expect(403);
    const bad = await (await as(ENGINEER)).post(`/api/sites/${site.east}/statements/2026-10/restate`).send({ reason: ' ' }).expect(400);
    expect(JSON.stringify(bad.body)).toMatch(/Say why/);
    nowMs = Date.parse('2026-11-04T09:00:00Z');
    const res = await (
      await as(ENGINEER)
    )
      .post(`/api/sites/${site.east}/statements/2026-10/restate`)
      .send({ reason: 'Readings of 11 October arrived late' })
      .expect(200);
    const v2 = res.body as MonthlyStatement;
    expect(v2.lock).toMatchObject({
      version: 2,
      state: 'locked',
      reason: 'Readings of 11 October arrived late',
      restatementSuggestedAt: null,
    });
    expect(v2.lock!.lockedBy).toBeTruthy();
    expect(v2.lock!.versions.map((v) => [v.version, v.state])).toEqual([
      [2, 'locked'],
      [1, 'superseded'],
    ]);
    expect(recomputedChecksum(v2)).toBe(v2.lock!.checksum);
    expect(v2.site.energyKwh).toBeGreaterThan(before.site.energyKwh); // the late minute counts now
    const v1 = await get(OWNER, `/api/sites/${site.east}/statements/2026-10?version=1`);
    expect(v1.lock).toMatchObject({ version: 1, state: 'superseded' });
    expect(v1.site.energyKwh).toBe(before.site.energyKwh);
    expect(recomputedChecksum(v1)).toBe(before.lock!.checksum);
    await (await as(OWNER)).get(`/api/sites/${site.east}/statements/2026-10?version=3`).expect(404);
    await (await as(OTHER_OWNER)).get(`/api/sites/${site.east}/statements/2026-10?version=1`).expect(404);
    const audit = await stack.db('audit_log').where({ action: 'statement-restate' }).first('target', 'detail');
    expect(audit.target).toBe(`site:${site.east}`);
    expect(json(audit.detail)).toMatchObject({ month: '2026-10', version: 2 });
  });

  it('refuses to restate a month that is not locked', async () => {
    const r = await (
      await as(ENGINEER)
    )
      .post(`/api/sites/${site.west}/statements/2026-11/restate`)
      .send({ reason: 'Too early' })
      .expect(409);
    expect(r.body.error.message).toMatch(/not locked yet/);
  });
});

describe("the demo start's lock step (server/scripts/statement-locks.ts)", () => {
  it('locks every due month but the newest, silently, once', async () => {
    const { createTestDatabase } = await import('../helpers/test-db');
    const t = await createTestDatabase({ seed: true });
    try {
      const owner = (await t.db('owners').first('id')).id as number;
      const [siteId] = await t.db('sites').insert({
        owner_id: owner,
        name: 'Script test roof',
        latitude_deg: 35.68,
        longitude_deg: 139.69,
        elevation_m: 10,
        time_zone: 'Asia/Tokyo',
      });
      const [unitId] = await t.db('units').insert({
        serial: 'LCK-SCRIPT-0',
        site_id: siteId,
        rated_power_wp: 400,
        detector_tilt_deg: 10,
        firmware: 'test',
        device_secret_hash: 'sha256:00',
      });
      await t.db('telemetry_15m').insert(EAST_MONTHS.flatMap((m) => dayRows([unitId!], `${m}-10`, 'Asia/Tokyo')));
      const run = () =>
        execFileSync('node', ['--import', 'tsx', 'server/scripts/statement-locks.ts', 'past', '--now', '2026-11-05T00:00:00Z'], {
          encoding: 'utf8',
          env: { ...process.env, BW_DB_NAME: t.config.db.database },
        });
      expect(run()).toContain('[statements] 11 past months locked silently');
      expect(run()).toBe(''); // months locked already are left alone
      const rows = await t.db('statements').where({ site_id: siteId }).orderBy('month').select('month', 'silent', 'state');
      expect(rows.map((r) => r.month)).toEqual(EAST_MONTHS.slice(2, 13)); // November 2025 … September 2026; October is the server's
      expect(rows.every((r) => r.silent && r.state === 'locked')).toBe(true);
      expect(await t.db('mail_outbox').count({ n: '*' }).first()).toEqual({ n: 0 });
    } finally {
      await t.drop();
    }
  }, 60_000);
});

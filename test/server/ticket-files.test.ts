import { createHash, randomBytes } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { signedIn } from '../helpers/signed-in';
import { startTestStack } from '../helpers/test-stack';
import type { TicketFileView, TicketView } from '../../shared/contracts/tickets';
import { whenAndWhere } from '../../server/services/upload-check';
import { instantOfWallTime } from '../../server/services/local-time';
import { pino } from 'pino';
import { TicketFileService } from '../../server/services/ticket-file-service';
import type { TicketFileRepository } from '../../server/data/ticket-file-repository';
import type { TicketRepository } from '../../server/data/ticket-repository';
import type { AdminService } from '../../server/services/admin-service';

let stack: Awaited<ReturnType<typeof startTestStack>>;
const as = signedIn(() => stack.http);
const ADMIN = 'admin@saltmarsh.example';
const ENGINEER = 'engineer@saltmarsh.example';
const TECH = 'tech1@saltmarsh.example';
const CREW = 'crew1@saltmarsh.example';
const OTHER_CREW = 'crew2@saltmarsh.example';
const OWNER = 'owner@quillmoor.example'; // owns QHL
const OTHER_OWNER = 'owner@fenwicklane.example';

/** Invented photo evidence: a camera that wrote its time with a UTC offset, its place, and "turn 90° to show upright". */
const TAKEN = { wall: '2026:11:30 10:15:42', offset: '+01:00', utc: '2026-11-30T09:15:42.000Z' };
const PLACE = { lat: '51/1 30/1 1800/100', latRef: 'N', lon: '0/1 7/1 3000/100', lonRef: 'W', latDeg: 51.505, lonDeg: -0.125 };

interface Fixtures {
  jpeg: Buffer;
  png: Buffer;
  webp: Buffer;
  pdf: Buffer;
  elf: Buffer;
  bigPng: Buffer;
  truncatedPng: Buffer;
  truncatedJpeg: Buffer;
  svg: Buffer;
  gif: Buffer;
}
let fx: Fixtures;

/** Something to photograph: a gradient with a little structure (so JPEG and WebP have work to do). */
function pixels(width: number, height: number): Buffer {
  const b = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) {
      const i = (y * width + x) * 3;
      b[i] = (x * 255) / width;
      b[i + 1] = (y * 255) / height;
      b[i + 2] = ((x ^ y) & 0x3f) * 4;
    }
  return b;
}

/** A minimal PDF 1.4 (one empty page), with its cross-reference table and trailer. */
function minimalPdf(): Buffer {
  const objects = [
    '<< /Type /Catalog /Pages 2 0 R >>',
    '<< /Type /Pages /Kids [3 0 R] /Count 1 >>',
    '<< /Type /Page /Parent 2 0 R /MediaBox [0 0 595 842] >>',
  ];
  let body = '%PDF-1.4\n';
  const offsets: number[] = [];
  objects.forEach((o, i) => {
    offsets.push(body.length);
    body += `${i + 1} 0 obj\n${o}\nendobj\n`;
  });
  const xref = body.length;
  body += `xref\n0 ${objects.length + 1}\n0000000000 65535 f \n${offsets.map((o) => `${String(o).padStart(10, '0')} 00000 n \n`).join('')}`;
  body += `trailer\n<< /Size ${objects.length + 1} /Root 1 0 R >>\nstartxref\n${xref}\n%%EOF\n`;
  return Buffer.from(body, 'latin1');
}

let ticket: TicketView;
let otherTicket: TicketView;
const sha = (b: Buffer | Uint8Array) => createHash('sha256').update(b).digest('hex');
const rowsOf = async (ticketId: number) => Number((await stack.db('ticket_files').where({ ticket_id: ticketId }).count({ n: '*' }))[0]!.n);
const bucket = () => stack.files.keys();

beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  const raw = { raw: { width: 1600, height: 1200, channels: 3 as const } };
  const scene = pixels(1600, 1200);
  const noisy = randomBytes(1900 * 1900 * 3);
  const [jpeg, png, webp, bigPng, gif] = await Promise.all([
    sharp(scene, raw)
      .withExif({
        IFD0: { Make: 'Invented Optics', Model: 'Fieldcam 7' },
        IFD2: { DateTimeOriginal: TAKEN.wall, OffsetTimeOriginal: TAKEN.offset },
        IFD3: { GPSLatitudeRef: PLACE.latRef, GPSLatitude: PLACE.lat, GPSLongitudeRef: PLACE.lonRef, GPSLongitude: PLACE.lon },
      })
      .withMetadata({ orientation: 6 })
      .jpeg({ quality: 85 })
      .toBuffer(),
    sharp(pixels(640, 480), { raw: { width: 640, height: 480, channels: 3 } })
      .png()
      .toBuffer(),
    sharp(pixels(800, 600), { raw: { width: 800, height: 600, channels: 3 } })
      .webp()
      .toBuffer(),
    // Random pixels do not compress: a real PNG of about 10.3 MiB (> 10 MiB).
    sharp(noisy, { raw: { width: 1900, height: 1900, channels: 3 } })
      .png({ compressionLevel: 0 })
      .toBuffer(),
    sharp(pixels(64, 48), { raw: { width: 64, height: 48, channels: 3 } })
      .gif()
      .toBuffer(),
  ]);
  fx = {
    jpeg,
    png,
    webp,
    pdf: minimalPdf(),
    // The first 64 KiB of this Node binary: ELF bytes, to be sent as "photo.jpg" with an image type.
    elf: readFileSync(process.execPath).subarray(0, 64 * 1024),
    bigPng: Buffer.concat([bigPng, Buffer.alloc(Math.max(0, 12 * 1024 * 1024 - bigPng.length))]),
    truncatedPng: png.subarray(0, Math.floor(png.length * 0.6)),
    truncatedJpeg: jpeg.subarray(0, Math.floor(jpeg.length * 0.7)),
    gif,
    svg: Buffer.from(
      '<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><script>alert(1)</script><rect width="10" height="10"/></svg>',
    ),
  };

  const open = async (serial: string) =>
    (
      await (
        await as(TECH)
      ).agent
        .post('/api/tickets')
        .send({ unitId: stack.units.get(serial)!.id, title: 'Tilt drive noise', severity: 'P3' })
        .expect(201)
    ).body as TicketView;
  ticket = await open('QHL-2403');
  await (
    await as(TECH)
  ).agent
    .post(`/api/tickets/${ticket.id}/transition`)
    .send({ to: 'dispatched', assigneeId: (await as(CREW)).userId })
    .expect(200);
  otherTicket = await open('QHL-2404');
}, 60_000);
afterAll(async () => {
  await stack?.stop();
});

const upload = async (email: string, ticketId: number, bytes: Buffer, filename: string, contentType: string, caption?: string) => {
  const req = (await as(email)).agent.post(`/api/tickets/${ticketId}/files`).attach('file', bytes, { filename, contentType });
  return caption === undefined ? req : req.field('caption', caption);
};

describe('uploads checked by content store nothing when refused', () => {
  const refusals: [string, () => Buffer, string, string, number, string][] = [
    ['an executable renamed photo.jpg', () => fx.elf, 'photo.jpg', 'image/jpeg', 400, 'file_type_not_accepted'],
    ['a 12 MB PNG', () => fx.bigPng, 'roof.png', 'image/png', 413, 'file_too_large'],
    ['a PNG cut short', () => fx.truncatedPng, 'cut.png', 'image/png', 400, 'file_damaged'],
    ['a JPEG cut short', () => fx.truncatedJpeg, 'cut.jpg', 'image/jpeg', 400, 'file_damaged'],
    ['an SVG drawing', () => fx.svg, 'drawing.svg', 'image/svg+xml', 400, 'file_type_not_accepted'],
    ['an SVG sent as a JPEG', () => fx.svg, 'drawing.jpg', 'image/jpeg', 400, 'file_type_not_accepted'],
    ['a GIF (an image, but not one of the four)', () => fx.gif, 'site.gif', 'image/gif', 400, 'file_type_not_accepted'],
    ['a PDF without its end', () => fx.pdf.subarray(0, fx.pdf.length - 40), 'report.pdf', 'application/pdf', 400, 'file_damaged'],
  ];
  for (const [what, bytes, name, type, status, code] of refusals) {
    it(`refuses ${what} with ${status} ${code}: no row, no object`, async () => {
      const before = { rows: await rowsOf(ticket.id), keys: await bucket() };
      const res = await upload(TECH, ticket.id, bytes(), name, type);
      expect(res.status).toBe(status);
      expect(res.body.error.code).toBe(code);
      if (code === 'file_type_not_accepted') expect(res.body.error.message).toMatch(/JPEG, PNG or WebP photos and PDF documents/);
      if (status === 413) expect(res.body.error.message).toMatch(/larger than 10 MB/);
      expect({ rows: await rowsOf(ticket.id), keys: await bucket() }).toEqual(before);
    });
  }

  it('names what a refused file is, not what it was called', async () => {
    const elf = await upload(TECH, ticket.id, fx.elf, 'photo.jpg', 'image/jpeg');
    expect(elf.body.error.message).toMatch(/^An ELF file \(application\/x-elf\) is not a file a ticket accepts/);
    const gif = await upload(TECH, ticket.id, fx.gif, 'photo.jpg', 'image/jpeg');
    expect(gif.body.error.message).toMatch(/^A GIF file \(image\/gif\) is not a file a ticket accepts/);
  });

  it('refuses an upload without a file, and one with a field too many', async () => {
    const none = await (await as(TECH)).agent.post(`/api/tickets/${ticket.id}/files`).field('caption', 'nothing attached');
    expect(none.status).toBe(400);
    expect(none.body.error.fields).toEqual({ file: 'Required (multipart/form-data).' });
    const wrongField = await (
      await as(TECH)
    ).agent
      .post(`/api/tickets/${ticket.id}/files`)
      .attach('photo', fx.png, { filename: 'a.png', contentType: 'image/png' });
    expect(wrongField.status).toBe(400);
    expect(wrongField.body.error.message).toBe('Send one file, in the form field "file".');
    expect(await rowsOf(ticket.id)).toBe(0);
  });
});

describe('accepted files', () => {
  let photo: TicketFileView;

  it('stores a JPEG upright and without metadata, keeps when and where it was taken, and makes a 320 px WebP thumbnail', async () => {
    const keysBefore = await bucket();
    const res = await upload(CREW, ticket.id, fx.jpeg, 'gearbox before.jpg', 'image/jpeg', 'Gearbox before the swap');
    expect(res.status).toBe(201);
    photo = res.body;
    expect(photo).toMatchObject({
      ticketId: ticket.id,
      contentType: 'image/jpeg',
      fileName: 'gearbox before.jpg',
      caption: 'Gearbox before the swap',
      // Orientation 6 (turn 90° clockwise): 1600 × 1200 as shot, 1200 × 1600 upright.
      widthPx: 1200,
      heightPx: 1600,
      uploadedBy: { id: (await as(CREW)).userId, name: 'Ines Calder' },
      takenAt: TAKEN.utc,
      latitudeDeg: PLACE.latDeg,
      longitudeDeg: PLACE.lonDeg,
      url: `/api/tickets/${ticket.id}/files/${photo.id}`,
      thumbUrl: `/api/tickets/${ticket.id}/files/${photo.id}?thumb=1`,
    });
    expect(res.headers['location']).toBe(photo.url);
    const added = (await bucket()).filter((k) => !keysBefore.includes(k)).sort();
    expect(added).toHaveLength(2);
    expect(added[0]).toMatch(/^files\/[0-9a-f-]{36}$/);
    expect(added[1]).toMatch(/^thumbs\/[0-9a-f-]{36}$/);

    const got = await (await as(CREW)).agent.get(photo.url).buffer(true).expect(200);
    expect(got.headers['content-type']).toBe('image/jpeg');
    expect(got.headers['content-disposition']).toBe('inline; filename="gearbox before.jpg"');
    expect(got.headers['content-security-policy']).toBe("default-src 'none'; sandbox");
    expect(got.body.length).toBe(photo.sizeBytes);
    expect(sha(got.body)).toBe(photo.sha256);
    const served = await sharp(got.body).metadata();
    expect({ format: served.format, width: served.width, height: served.height }).toEqual({ format: 'jpeg', width: 1200, height: 1600 });
    expect({ exif: served.exif, orientation: served.orientation, xmp: served.xmp }).toEqual({
      exif: undefined,
      orientation: undefined,
      xmp: undefined,
    });

    const thumb = await (await as(CREW)).agent.get(photo.thumbUrl!).buffer(true).expect(200);
    expect(thumb.headers['content-type']).toBe('image/webp');
    const t = await sharp(thumb.body).metadata();
    expect({ format: t.format, width: t.width, height: t.height }).toEqual({ format: 'webp', width: 240, height: 320 });
  });

  it('accepts a PNG and a WebP with their own types and thumbnails, whatever the browser said they were', async () => {
    for (const [bytes, name, claimed, type, w, h, tw, th] of [
      [fx.png, 'plan.png', 'application/octet-stream', 'image/png', 640, 480, 320, 240],
      [fx.webp, 'meter', 'image/jpeg', 'image/webp', 800, 600, 320, 240],
    ] as const) {
      const res = await upload(TECH, ticket.id, bytes, name, claimed);
      expect(res.status).toBe(201);
      expect(res.body).toMatchObject({ contentType: type, widthPx: w, heightPx: h, takenAt: null, latitudeDeg: null });
      expect(res.body.fileName).toBe(`${name.replace(/\..*$/, '')}.${type.split('/')[1]}`);
      const got = await (await as(TECH)).agent.get(res.body.url).buffer(true).expect(200);
      expect(got.headers['content-type']).toBe(type);
      const thumb = await sharp((await (await as(TECH)).agent.get(res.body.thumbUrl).buffer(true).expect(200)).body).metadata();
      expect([thumb.format, thumb.width, thumb.height]).toEqual(['webp', tw, th]);
    }
  });

  it('keeps a PDF as uploaded, serves it as a download and has no thumbnail', async () => {
    const res = await upload(ENGINEER, ticket.id, fx.pdf, 'drive test report.pdf', 'application/pdf');
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({
      contentType: 'application/pdf',
      sizeBytes: fx.pdf.length,
      sha256: sha(fx.pdf),
      thumbUrl: null,
      widthPx: null,
    });
    const got = await (await as(ENGINEER)).agent.get(res.body.url).buffer(true).expect(200);
    expect(got.headers['content-type']).toBe('application/pdf');
    expect(got.headers['content-disposition']).toBe('attachment; filename="drive test report.pdf"');
    expect(Buffer.compare(got.body, fx.pdf)).toBe(0);
    const thumb = await (await as(ENGINEER)).agent.get(`${res.body.url}?thumb=1`);
    expect(thumb.status).toBe(404);
  });

  it('lists the files in the ticket view and the file list, oldest first, and audits each upload', async () => {
    const view = (await (await as(TECH)).agent.get(`/api/tickets/${ticket.id}`).expect(200)).body as TicketView;
    expect(view.files!.map((f) => [f.contentType, f.fileName])).toEqual([
      ['image/jpeg', 'gearbox before.jpg'],
      ['image/png', 'plan.png'],
      ['image/webp', 'meter.webp'],
      ['application/pdf', 'drive test report.pdf'],
    ]);
    const list = (await (await as(TECH)).agent.get(`/api/tickets/${ticket.id}/files`).expect(200)).body as TicketFileView[];
    expect(list).toEqual(view.files);
    const audit = await stack
      .db('audit_log')
      .where({ action: 'ticket-file-add', target: `ticket:${ticket.id}` })
      .orderBy('id');
    expect(audit.map((a) => [a.user_id, (typeof a.detail === 'string' ? JSON.parse(a.detail) : a.detail).sha256])).toEqual(
      list.map((f) => [f.uploadedBy!.id, f.sha256]),
    );
    expect(await rowsOf(ticket.id)).toBe(4);
    expect((await bucket()).length).toBe(4 + 3);
  });
});

describe('who adds and who reads', () => {
  it('refuses a crew member the ticket is not assigned to, and owners (their own site or another), before reading the file', async () => {
    const keys = await bucket();
    const rows = await rowsOf(ticket.id);
    const notAssigned = await upload(OTHER_CREW, ticket.id, fx.png, 'a.png', 'image/png');
    expect(notAssigned.status).toBe(403);
    expect(notAssigned.body.error.message).toBe(
      `Only the crew member assigned to ticket ${ticket.id} and the control room add files to it.`,
    );
    // Refused before the body is read, and answered as such even when the body is large.
    const large = await upload(OTHER_CREW, ticket.id, fx.bigPng, 'big.png', 'image/png');
    expect([large.status, large.body.error.code]).toEqual([403, 'forbidden']);
    // Nobody is assigned to the other ticket yet: no crew member may add to it.
    expect((await upload(CREW, otherTicket.id, fx.png, 'a.png', 'image/png')).status).toBe(403);
    expect((await upload(OWNER, ticket.id, fx.png, 'a.png', 'image/png')).status).toBe(403);
    expect((await upload(OTHER_OWNER, ticket.id, fx.png, 'a.png', 'image/png')).status).toBe(403);
    expect({ rows: await rowsOf(ticket.id), keys: await bucket() }).toEqual({ rows, keys });
  });

  it("serves the files to whoever may see the ticket: the site's owner yes, another owner 404", async () => {
    const [first] = (await (await as(TECH)).agent.get(`/api/tickets/${ticket.id}/files`).expect(200)).body as TicketFileView[];
    for (const who of [OWNER, OTHER_CREW, ADMIN]) {
      expect((await (await as(who)).agent.get(`/api/tickets/${ticket.id}/files`)).status, who).toBe(200);
      expect((await (await as(who)).agent.get(first!.url)).status, who).toBe(200);
    }
    const other = await as(OTHER_OWNER);
    expect((await other.agent.get(`/api/tickets/${ticket.id}/files`)).status).toBe(404);
    expect((await other.agent.get(first!.url)).status).toBe(404);
    expect((await other.agent.get(first!.thumbUrl!)).status).toBe(404);
    // A file id of another ticket is not found under this one.
    expect((await (await as(TECH)).agent.get(`/api/tickets/${otherTicket.id}/files/${first!.id}`)).status).toBe(404);
  });

  it('takes no new files on a cancelled ticket (its record is final)', async () => {
    const t = (
      await (
        await as(TECH)
      ).agent
        .post('/api/tickets')
        .send({ unitId: stack.units.get('QHL-2405')!.id, title: 'Opened in error', severity: 'P4' })
        .expect(201)
    ).body as TicketView;
    await (await as(TECH)).agent.post(`/api/tickets/${t.id}/transition`).send({ to: 'cancelled', reason: 'duplicate' }).expect(200);
    const res = await upload(TECH, t.id, fx.png, 'late.png', 'image/png');
    expect(res.status).toBe(409);
    expect(await rowsOf(t.id)).toBe(0);
  });
});

describe('when and where a photo was taken', () => {
  const exifOf = async (exif: Parameters<ReturnType<typeof sharp>['withExif']>[0]) =>
    (
      await sharp(
        await sharp({ create: { width: 8, height: 8, channels: 3, background: '#888' } })
          .withExif(exif)
          .jpeg()
          .toBuffer(),
      ).metadata()
    ).exif;
  const NOW = Date.parse('2027-01-01T00:00:00Z');

  it('reads a camera clock without an offset in the site zone (Berlin in winter is UTC+1, in summer UTC+2)', async () => {
    const winter = whenAndWhere(await exifOf({ IFD2: { DateTimeOriginal: '2026:01:15 12:00:00' } }), 'Europe/Berlin', NOW);
    expect(winter.takenAt?.toISOString()).toBe('2026-01-15T11:00:00.000Z');
    const summer = whenAndWhere(await exifOf({ IFD2: { DateTimeOriginal: '2026:07:15 12:00:00' } }), 'Europe/Berlin', NOW);
    expect(summer.takenAt?.toISOString()).toBe('2026-07-15T10:00:00.000Z');
    expect(instantOfWallTime(Date.parse('2026-07-15T12:00:00Z'), 'America/New_York')).toBe(Date.parse('2026-07-15T16:00:00Z'));
  });

  it("prefers the GPS receiver's UTC time to a clock without an offset; drops 0°/0° and times after now", async () => {
    const gpsTime = whenAndWhere(
      await exifOf({
        IFD2: { DateTimeOriginal: '2026:07:15 12:00:00' },
        IFD3: { GPSDateStamp: '2026:07:15', GPSTimeStamp: '09/1 30/1 15/1' },
      }),
      'Europe/Berlin',
      NOW,
    );
    expect(gpsTime.takenAt?.toISOString()).toBe('2026-07-15T09:30:15.000Z');
    const noFix = whenAndWhere(
      await exifOf({
        IFD2: { DateTimeOriginal: '2031:01:01 00:00:00', OffsetTimeOriginal: '+00:00' },
        IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '0/1 0/1 0/1', GPSLongitudeRef: 'E', GPSLongitude: '0/1 0/1 0/1' },
      }),
      'UTC',
      NOW,
    );
    expect(noFix).toEqual({ takenAt: null, latitudeDeg: null, longitudeDeg: null });
  });
});

describe('a failure after the objects are written', () => {
  it('takes the objects back when the row cannot be stored', async () => {
    const puts: string[] = [];
    const deleted: string[][] = [];
    const store = {
      put: async (key: string) => void puts.push(key),
      get: async () => undefined,
      delete: async (keys: string[]) => void deleted.push(keys),
    };
    const failingRows = { insert: async () => Promise.reject(new Error('database went away')) } as unknown as TicketFileRepository;
    const oneTicket = { get: async () => ({ id: 7, siteId: 1, state: 'on-site', assignee: null }) } as unknown as TicketRepository;
    const sites = { getSite: async () => ({ timeZone: 'UTC' }) } as unknown as AdminService;
    const service = new TicketFileService(failingRows, oneTicket, sites, store, pino({ level: 'silent' }));
    await expect(
      service.add({ id: 1, role: 'technician', ownerId: null }, 7, { bytes: fx.png, originalName: 'a.png', caption: undefined }),
    ).rejects.toThrow('database went away');
    expect(puts).toHaveLength(2);
    expect(deleted).toEqual([puts]);
  });
});

import sharp from 'sharp';
import type { Logger } from 'pino';
import type { Db } from '../data/db';
import type { ObjectStore } from '../services/ticket-file-service';
import { storeTicketFile } from '../services/ticket-file-service';
import { TicketFileRepository } from '../data/ticket-file-repository';

/**
 * A few invented site photos for the demo's past tickets: drawings made here (a tracker on its post against the sky, its
 * drive, a detector pair), never real pictures. Each of the latest past tickets of a unit gets a "before" and an "after"
 * through the same path as an upload (checked, re-encoded, thumbnail, audited), dated while the crew was on site.
 * Once: nothing is added when any ticket already has a file (a restart's gap fill adds no more).
 */
const PHOTOS_PER_RUN = 12;

function drawing(kind: 'tracker' | 'drive' | 'detectors', variant: number, after: boolean): Buffer {
  const sky = ['#8fc3e8', '#a9cde6', '#c7d8e4'][variant % 3];
  const dirt = after
    ? ''
    : '<g fill="#8a7350" opacity="0.55"><circle cx="520" cy="300" r="30"/><circle cx="690" cy="360" r="22"/><circle cx="600" cy="420" r="40"/></g>';
  const body =
    kind === 'tracker'
      ? `<rect x="585" y="420" width="30" height="380" fill="#6b6f73"/>
         <g transform="rotate(${-18 + variant * 7} 600 420)"><rect x="380" y="250" width="440" height="260" rx="6" fill="#1f3b5c" stroke="#d7dde3" stroke-width="8"/>
         <path d="M380 337h440M380 423h440M527 250v260M673 250v260" stroke="#d7dde3" stroke-width="4"/>${dirt}</g>`
      : kind === 'drive'
        ? `<rect x="300" y="330" width="600" height="240" rx="24" fill="#5d6166"/>
           <circle cx="600" cy="450" r="${after ? 96 : 90}" fill="#9aa0a6" stroke="#2f3337" stroke-width="14" stroke-dasharray="22 12"/>
           <circle cx="600" cy="450" r="26" fill="#2f3337"/>${after ? '' : '<path d="M470 400l40 20-35 25" stroke="#c0392b" stroke-width="10" fill="none"/>'}`
        : `<rect x="420" y="300" width="360" height="300" rx="16" fill="#e9ecef" stroke="#495057" stroke-width="8"/>
           <path d="M600 300v300" stroke="#495057" stroke-width="8"/>
           <rect x="450" y="360" width="120" height="180" fill="${after ? '#1c2e4a' : '#6f6a55'}"/><rect x="630" y="360" width="120" height="180" fill="#1c2e4a"/>`;
  return Buffer.from(
    `<svg xmlns="http://www.w3.org/2000/svg" width="1200" height="900"><rect width="1200" height="900" fill="${sky}"/>
     <rect y="700" width="1200" height="200" fill="#7a8c5a"/>${body}</svg>`,
  );
}

export async function attachDemoPhotos(db: Db, store: ObjectStore, log: Logger): Promise<number> {
  if (await db('ticket_files').first('id')) return 0;
  const tickets: { id: number; kind: string; on_site_at: Date; resolved_at: Date; assignee_id: number; time_zone: string }[] = await db(
    'tickets as t',
  )
    .join('sites as s', 's.id', 't.site_id')
    .leftJoin('ticket_files as f', 'f.ticket_id', 't.id')
    .whereNull('f.id')
    .whereNotNull('t.unit_id')
    .whereNotNull('t.on_site_at')
    .whereNotNull('t.resolved_at')
    .whereNotNull('t.assignee_id')
    .orderBy('t.resolved_at', 'desc')
    .limit(PHOTOS_PER_RUN / 2)
    .select('t.id', 't.kind', 't.on_site_at', 't.resolved_at', 't.assignee_id', 's.time_zone');
  const repo = new TicketFileRepository(db);
  let n = 0;
  for (const [i, t] of tickets.entries()) {
    const kind = t.kind === 'stall' || t.kind === 'not-stowed' ? 'drive' : t.kind === 'drift' ? 'detectors' : 'tracker';
    for (const after of [false, true]) {
      const bytes = await sharp(drawing(kind, i, after))
        .jpeg({ quality: 80 })
        .toBuffer();
      const at = after ? t.resolved_at.getTime() - 5 * 60_000 : t.on_site_at.getTime() + 5 * 60_000;
      await storeTicketFile(
        { repo, store, log },
        t.id,
        t.time_zone,
        {
          bytes,
          originalName: `${after ? 'after' : 'before'}-${t.id}.jpg`,
          caption: after ? 'After the work (demo drawing)' : 'As found on arrival (demo drawing)',
        },
        t.assignee_id,
        Math.max(at, t.on_site_at.getTime()),
      );
      n++;
    }
  }
  return n;
}

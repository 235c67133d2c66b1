import { randomUUID, createHash } from 'node:crypto';
import type { Logger } from 'pino';
import type { TicketFileType, TicketFileView } from '../../shared/contracts/tickets';
import { may } from '../../shared/contracts/permissions';
import { conflict, forbidden, notFound } from '../errors/app-error';
import type { StoredTicket, TicketRepository } from '../data/ticket-repository';
import type { StoredTicketFile, TicketFileRepository } from '../data/ticket-file-repository';
import type { AdminService } from './admin-service';
import { scopeOf, type Caller } from './caller';
import { checkUpload } from './upload-check';

/** Where the bytes go (the S3 API; server/data/file-store.ts). */
export interface ObjectStore {
  put(key: string, bytes: Buffer, contentType: string): Promise<void>;
  get(key: string): Promise<Buffer | undefined>;
  delete(keys: string[]): Promise<void>;
}

export interface TicketUpload {
  bytes: Buffer;
  /** The name the client sent (kept, cleaned, as the name to save under; never used to tell the type). */
  originalName: string | undefined;
  caption: string | undefined;
}

/** What `GET /api/tickets/:id/files/:fileId` sends. */
export interface FileContent {
  bytes: Buffer;
  contentType: string;
  fileName: string;
  /** Photos show in the browser; documents download. */
  inline: boolean;
}

const FINAL_STATES: readonly string[] = ['closed', 'cancelled'];

/** A name to save under: the uploaded one's letters, digits, spaces, dots, dashes and underscores, with the extension its content has. */
export function cleanFileName(original: string | undefined, extension: string, ticketId: number): string {
  const base = (original ?? '').split(/[\\/]/).pop() ?? '';
  const stem = base
    .replace(/\.[^.]*$/, '')
    .normalize('NFC')
    .replace(/[^\p{L}\p{N} ._-]+/gu, '-')
    .replace(/[\s-]{2,}/g, '-')
    .replace(/^[.\s-]+|[.\s-]+$/g, '')
    .slice(0, 100);
  return `${stem || `ticket-${ticketId}`}.${extension}`;
}

/**
 * Photos and documents of tickets. Everyone who may see a ticket may read its files (owners their own sites'; 404
 * otherwise). The control room (technicians, engineers, admins) adds files to any ticket; a crew member only to a
 * ticket assigned to them; nobody to a closed or cancelled one (its record is final). A file is checked by content
 * (upload-check.ts) before anything is stored; its bytes go to the object store under random keys, and its row and
 * audit entry are written after, so a refusal stores nothing and a failure takes the objects back.
 */
export class TicketFileService {
  constructor(
    private readonly repo: TicketFileRepository,
    private readonly tickets: TicketRepository,
    private readonly admin: AdminService,
    private readonly store: ObjectStore,
    private readonly log: Logger,
    private readonly now: () => number = Date.now,
  ) {}

  /** The ticket if the caller may add a file to it now: 404 out of scope, 403 for others' tickets, 409 when final. */
  async uploadable(c: Caller, ticketId: number): Promise<StoredTicket> {
    const t = await this.visible(c, ticketId);
    if (!may(c.role, 'addTicketFiles')) throw forbidden('Owners read the files of their tickets; they add none.');
    if (c.role === 'crew' && t.assignee?.id !== c.id)
      throw forbidden(`Only the crew member assigned to ticket ${t.id} and the control room add files to it.`);
    if (FINAL_STATES.includes(t.state))
      throw conflict(`Ticket ${t.id} is ${t.state}: its record is final. Reopen it to add files.`, { state: t.state });
    return t;
  }

  async add(c: Caller, ticketId: number, upload: TicketUpload): Promise<TicketFileView> {
    const t = await this.uploadable(c, ticketId);
    const site = await this.admin.getSite(c, t.siteId);
    return storeTicketFile({ repo: this.repo, store: this.store, log: this.log }, t.id, site.timeZone, upload, c.id, this.now());
  }

  async list(c: Caller, ticketId: number): Promise<TicketFileView[]> {
    const t = await this.visible(c, ticketId);
    return this.forTicket(t.id);
  }

  /** A ticket's files for its view (the caller's access to the ticket is checked already). */
  async forTicket(ticketId: number): Promise<TicketFileView[]> {
    return (await this.repo.forTicket(ticketId)).map(view);
  }

  /** The bytes of a file, or of its thumbnail (photos only; 404 for a document). */
  async content(c: Caller, ticketId: number, fileId: number, thumb: boolean): Promise<FileContent> {
    const t = await this.visible(c, ticketId);
    const f = await this.repo.get(t.id, fileId);
    if (!f) throw notFound('File');
    if (thumb && !f.thumbKey) throw notFound('Thumbnail (documents have none)');
    const key = thumb ? f.thumbKey! : f.objectKey;
    const bytes = await this.store.get(key);
    if (!bytes) {
      this.log.error({ ticketId, fileId, key }, 'ticket file row without its object');
      throw notFound('File content');
    }
    return {
      bytes,
      contentType: thumb ? 'image/webp' : f.contentType,
      fileName: thumb ? f.fileName.replace(/\.[^.]+$/, '-thumbnail.webp') : f.fileName,
      inline: thumb || f.contentType.startsWith('image/'),
    };
  }

  private async visible(c: Caller, ticketId: number): Promise<StoredTicket> {
    const t = await this.tickets.get(ticketId, scopeOf(c));
    if (!t) throw notFound('Ticket');
    return t;
  }
}

function view(f: StoredTicketFile): TicketFileView {
  const url = `/api/tickets/${f.ticketId}/files/${f.id}`;
  return {
    id: f.id,
    ticketId: f.ticketId,
    contentType: f.contentType as TicketFileType,
    fileName: f.fileName,
    sizeBytes: f.sizeBytes,
    sha256: f.sha256,
    caption: f.caption,
    widthPx: f.widthPx,
    heightPx: f.heightPx,
    uploadedBy: f.uploadedBy,
    uploadedAt: f.uploadedAt.toISOString(),
    takenAt: f.takenAt ? f.takenAt.toISOString() : null,
    latitudeDeg: f.latitudeDeg,
    longitudeDeg: f.longitudeDeg,
    url,
    thumbUrl: f.thumbKey ? `${url}?thumb=1` : null,
  };
}

/**
 * Checks a file by its content, stores its object (and thumbnail) and then its row with the audit entry; removes the
 * objects again when the row fails, so nothing is half-written. The one path every ticket file takes: uploads through
 * `TicketFileService.add` (after its access checks) and the demo's past photos.
 */
export async function storeTicketFile(
  deps: { repo: TicketFileRepository; store: ObjectStore; log: Logger },
  ticketId: number,
  siteTimeZone: string,
  upload: TicketUpload,
  byUserId: number,
  atMs: number,
): Promise<TicketFileView> {
  const checked = await checkUpload(upload.bytes, siteTimeZone, atMs);
  const objectKey = `files/${randomUUID()}`;
  const thumbKey = checked.thumb ? `thumbs/${randomUUID()}` : null;
  const stored: string[] = [];
  try {
    await deps.store.put(objectKey, checked.bytes, checked.contentType);
    stored.push(objectKey);
    if (thumbKey) {
      await deps.store.put(thumbKey, checked.thumb!, 'image/webp');
      stored.push(thumbKey);
    }
    const sha256 = createHash('sha256').update(checked.bytes).digest('hex');
    const fileName = cleanFileName(upload.originalName, checked.extension, ticketId);
    const id = await deps.repo.insert(
      {
        ticketId,
        objectKey,
        thumbKey,
        contentType: checked.contentType,
        fileName,
        sizeBytes: checked.bytes.length,
        sha256,
        caption: upload.caption?.trim() || null,
        widthPx: checked.widthPx,
        heightPx: checked.heightPx,
        uploadedBy: byUserId,
        uploadedAt: new Date(atMs),
        takenAt: checked.takenAt,
        latitudeDeg: checked.latitudeDeg,
        longitudeDeg: checked.longitudeDeg,
      },
      {
        userId: byUserId,
        action: 'ticket-file-add',
        target: `ticket:${ticketId}`,
        detail: { fileName, contentType: checked.contentType, sizeBytes: checked.bytes.length, sha256 },
      },
    );
    return view((await deps.repo.get(ticketId, id))!);
  } catch (err) {
    await deps.store.delete(stored).catch((e) => deps.log.error({ err: e, keys: stored }, 'orphaned ticket file objects not removed'));
    throw err;
  }
}

import type { Db } from './db';
import { appendAudit, type AuditEntry } from './audit-repository';

/** A ticket file as stored (the object store holds the bytes under `objectKey` and `thumbKey`). */
export interface StoredTicketFile {
  id: number;
  ticketId: number;
  objectKey: string;
  thumbKey: string | null;
  contentType: string;
  fileName: string;
  sizeBytes: number;
  sha256: string;
  caption: string | null;
  widthPx: number | null;
  heightPx: number | null;
  uploadedBy: { id: number; name: string } | null;
  uploadedAt: Date;
  takenAt: Date | null;
  latitudeDeg: number | null;
  longitudeDeg: number | null;
}

export type NewTicketFile = Omit<StoredTicketFile, 'id' | 'uploadedBy'> & { uploadedBy: number };

/** The rows of `ticket_files`; the bytes are the file store's. */
export class TicketFileRepository {
  constructor(private readonly db: Db) {}

  /** Stores a file's row and its audit entry in one transaction; the entry gets the new file's id. */
  async insert(f: NewTicketFile, audit: AuditEntry): Promise<number> {
    return this.db.transaction(async (trx) => {
      const [id] = await trx('ticket_files').insert({
        ticket_id: f.ticketId,
        object_key: f.objectKey,
        thumb_key: f.thumbKey,
        content_type: f.contentType,
        file_name: f.fileName,
        size_bytes: f.sizeBytes,
        sha256: f.sha256,
        caption: f.caption,
        width_px: f.widthPx,
        height_px: f.heightPx,
        uploaded_by: f.uploadedBy,
        uploaded_at: f.uploadedAt,
        taken_at: f.takenAt,
        latitude_deg: f.latitudeDeg,
        longitude_deg: f.longitudeDeg,
      });
      await appendAudit(trx, { ...audit, detail: { fileId: id, ...(audit.detail as object) } });
      return id!;
    });
  }

  /** A ticket's files, oldest first. */
  async forTicket(ticketId: number): Promise<StoredTicketFile[]> {
    return (await this.base().where('f.ticket_id', ticketId).orderBy('f.id')).map(toFile);
  }

  async get(ticketId: number, fileId: number): Promise<StoredTicketFile | undefined> {
    const r = await this.base().where({ 'f.ticket_id': ticketId, 'f.id': fileId }).first();
    return r ? toFile(r) : undefined;
  }

  private base() {
    return this.db('ticket_files as f').leftJoin('users as u', 'u.id', 'f.uploaded_by').select('f.*', 'u.name as uploaded_by_name');
  }
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- a joined row straight from the driver
function toFile(r: any): StoredTicketFile {
  return {
    id: r.id,
    ticketId: r.ticket_id,
    objectKey: r.object_key,
    thumbKey: r.thumb_key,
    contentType: r.content_type,
    fileName: r.file_name,
    sizeBytes: r.size_bytes,
    sha256: r.sha256,
    caption: r.caption,
    widthPx: r.width_px,
    heightPx: r.height_px,
    uploadedBy: r.uploaded_by !== null ? { id: r.uploaded_by, name: r.uploaded_by_name } : null,
    uploadedAt: r.uploaded_at,
    takenAt: r.taken_at,
    latitudeDeg: r.latitude_deg,
    longitudeDeg: r.longitude_deg,
  };
}

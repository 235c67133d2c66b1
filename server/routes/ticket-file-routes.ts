import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { TICKET_FILE_CAPTION_MAX, TICKET_FILE_MAX_BYTES } from '../../shared/contracts/tickets';
import { AppError, badRequest } from '../errors/app-error';
import type { TicketFileService } from '../services/ticket-file-service';
import { callerOf, requireRole } from './access';
import { idParam, parse } from './validation';

const fileParams = z.strictObject({
  id: z.coerce.number().int().positive('Must be a positive whole number.'),
  fileId: z.coerce.number().int().positive('Must be a positive whole number.'),
});
const contentQuery = z.strictObject({ thumb: z.enum(['1', 'true', '0', 'false'], 'Use thumb=1 for the thumbnail.').optional() });
const uploadFields = z.strictObject({
  caption: z.string().max(TICKET_FILE_CAPTION_MAX, `At most ${TICKET_FILE_CAPTION_MAX} characters.`).optional(),
});

const MB = TICKET_FILE_MAX_BYTES / (1024 * 1024);

/** Reads one file (field `file`) into memory, at most 10 MiB; multer's refusals in the API's error shape. */
function receiveOne(): RequestHandler {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: TICKET_FILE_MAX_BYTES, files: 1, fields: 1, fieldSize: TICKET_FILE_CAPTION_MAX * 4, parts: 2 },
    defParamCharset: 'utf8',
  }).single('file');
  return (req, res, next) =>
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE')
          return next(
            new AppError(413, 'file_too_large', `The file is larger than ${MB} MB: send at most ${MB} MB per file.`, {
              file: `At most ${MB} MB.`,
            }),
          );
        const fields: Record<string, string> = { [err.field ?? 'file']: err.message };
        return next(
          badRequest(
            err.code === 'LIMIT_UNEXPECTED_FILE' || err.code === 'LIMIT_FILE_COUNT'
              ? 'Send one file, in the form field "file".'
              : `The upload has a field too many or too long (${err.message}): send "file" and, optionally, "caption".`,
            fields,
          ),
        );
      }
      next(err);
    });
}

/**
 * A ticket's photos and documents. Mounted behind requireSession; everyone who may see the ticket reads them (owners
 * their own sites'; 404 otherwise).
 *   POST /tickets/:id/files  multipart: file (JPEG, PNG, WebP or PDF by content, ≤ 10 MiB), caption?   → 201 the file
 *        the control room on any open ticket; a crew member on a ticket assigned to them (403 otherwise); 413 too large
 *   GET  /tickets/:id/files              the ticket's files, oldest first
 *   GET  /tickets/:id/files/:fileId      the bytes (photos inline, documents as a download); ?thumb=1 a photo's 320 px WebP
 */
export function ticketFileRoutes(files: TicketFileService): Router {
  const r = Router();

  r.post(
    '/tickets/:id/files',
    requireRole('addTicketFiles'),
    // Who may add is settled before the body is read: a refused caller's upload is never held in memory.
    async (req, _res, next) => {
      await files.uploadable(callerOf(req), parse(idParam, req.params).id);
      next();
    },
    receiveOne(),
    async (req, res) => {
      const id = parse(idParam, req.params).id;
      const { caption } = parse(uploadFields, { ...req.body }, 'The upload');
      if (!req.file)
        throw badRequest('No file: send it as multipart/form-data in the field "file".', { file: 'Required (multipart/form-data).' });
      const view = await files.add(callerOf(req), id, { bytes: req.file.buffer, originalName: req.file.originalname, caption });
      res.status(201).location(view.url).json(view);
    },
  );

  r.get('/tickets/:id/files', async (req, res) => {
    res.json(await files.list(callerOf(req), parse(idParam, req.params).id));
  });

  r.get('/tickets/:id/files/:fileId', async (req, res) => {
    const { id, fileId } = parse(fileParams, req.params);
    const { thumb } = parse(contentQuery, req.query);
    const f = await files.content(callerOf(req), id, fileId, thumb === '1' || thumb === 'true');
    res.attachment(f.fileName);
    if (f.inline) res.setHeader('Content-Disposition', String(res.getHeader('Content-Disposition')).replace(/^attachment/, 'inline'));
    res.type(f.contentType);
    // Uploaded content never runs as a page of ours; a browser asks again each time (access is checked per request).
    res.setHeader('Content-Security-Policy', "default-src 'none'; sandbox");
    res.setHeader('Cache-Control', 'private, no-cache');
    res.send(f.bytes);
  });
  return r;
}

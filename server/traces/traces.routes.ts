import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import type { Request, RequestHandler, Response } from 'express';
import multer from 'multer';
import {
  ReferenceSchema,
  TraceListQuerySchema,
  TraceUploadSchema,
  TraceViewQuerySchema,
  type DuplicateFile,
  type UploadResult,
} from '../../shared/schemas/traces';
import { currentUser } from '../auth/guards';
import type { AppContext } from '../context';
import { AppError, capMessage, isMalformedMultipart, malformedMultipartError, multerAppError } from '../errors';
import { ApiRouter, handle } from '../http/api-router';
import { idempotencyKey } from '../http/idempotency';
import { IdParam } from '../http/params';
import { nulByteError, repeatedFieldError, textTrouble, uploadedFileName } from '../http/strict-input';
import { analysisPool } from './analysis-pool';
import { holdInbox, inboxDir, releaseInbox } from './trace-store';
import * as traces from './traces.service';

export const MAX_FILES_PER_UPLOAD = 10;
const CSV_TYPES = new Set(['text/csv', 'text/plain', 'application/csv', 'application/vnd.ms-excel', 'application/octet-stream', 'text/comma-separated-values', '']);

/** The inbox files each upload in progress holds (see `holdInbox`). */
const inboxHeldBy = new WeakMap<Request, string[]>();

/** Frees the upload's place among the uploads its sender has under way (see `uploadMiddleware`). */
const uploadDoneBy = new WeakMap<Request, () => void>();

/** The uploader's file name, as they wrote it (see `uploadedFileName`). */
const fileName = (f: Express.Multer.File) => uploadedFileName(f.originalname);

/**
 * The multipart reader: files are streamed straight to the upload inbox on
 * disk (never held whole in memory), with limits on size and count; every
 * way a form can be broken or too big answers 4xx with a message, and what
 * was already written of it is removed.
 */
function uploadMiddleware(ctx: AppContext): RequestHandler {
  const mb = Math.round((ctx.config.maxUploadBytes / 1024 / 1024) * 10) / 10;
  const inbox = inboxDir(ctx.config.uploadDir);
  fs.mkdirSync(inbox, { recursive: true, mode: 0o750 });
  const upload = multer({
    storage: multer.diskStorage({
      destination: inbox,
      filename: (req, _file, cb) => {
        // Held from before the file exists until the request is done with it, so the sweep while running never takes it.
        const name = `${randomUUID()}.part`;
        const file = path.join(inbox, name);
        inboxHeldBy.set(req, [...(inboxHeldBy.get(req) ?? []), file]);
        holdInbox(file);
        cb(null, name);
      },
    }),
    limits: { fileSize: ctx.config.maxUploadBytes, files: MAX_FILES_PER_UPLOAD, fields: 20, fieldSize: 2048, parts: MAX_FILES_PER_UPLOAD + 20, headerPairs: 200 },
    fileFilter: (_req, file, cb) => {
      const name = Buffer.from(file.originalname, 'latin1').toString('utf8');
      if (name.includes('\0')) return cb(nulByteError('file name', 'file'));
      const ext = path.extname(name).toLowerCase();
      if (ext !== '.csv' || !CSV_TYPES.has(file.mimetype)) {
        const shown = capMessage(name, 120);
        return cb(
          new AppError(415, 'wrong_file_type', `"${shown}" is not a CSV file. Export the trace from the instrument as CSV (.csv) and upload that.`, {
            fields: [{ field: 'file', message: `${shown}: only .csv files are accepted` }],
          }),
        );
      }
      cb(null, true);
    },
  }).array('file', MAX_FILES_PER_UPLOAD);
  // Uploads under way per person on this instance, from the first byte of the form to the answer.
  const underWay = new Map<number, number>();
  return (req, res, next) => {
    const type = (req.get('content-type') ?? '').trim();
    if (!/^multipart\/form-data(;|$)/i.test(type)) {
      const sent = type ? `as ${capMessage(type.split(';')[0], 60)}` : 'without a content type';
      return next(
        new AppError(415, 'not_multipart', `The upload was sent ${sent}. Send the trace as multipart/form-data: the CSV file in the "file" field, cableRunId and end as form fields. Nothing was stored.`, {
          fields: [{ field: 'Content-Type', message: 'must be multipart/form-data' }],
        }),
      );
    }
    // Each upload holds a connection, up to ten files' worth of the inbox's disk and its small files' analyses:
    // one account opening dozens of slow uploads at once would fill the disk and the pool for everyone.
    const userId = currentUser(req).id;
    const cap = ctx.config.uploadsAtOncePerUser;
    const now = underWay.get(userId) ?? 0;
    if (now >= cap) {
      res.setHeader('retry-after', '30');
      return next(
        new AppError(429, 'too_many_uploads', `You have ${now} uploads under way; each person may send at most ${cap} at once. Nothing was stored: send this one again when one of them has finished.`, {
          fields: [{ field: 'file', message: `at most ${cap} uploads at once per person` }],
          limit: cap,
          retryAfterSeconds: 30,
        }),
      );
    }
    underWay.set(userId, now + 1);
    let done = false;
    const finished = () => {
      if (done) return;
      done = true;
      const left = (underWay.get(userId) ?? 1) - 1;
      if (left > 0) underWay.set(userId, left);
      else underWay.delete(userId);
    };
    // The place is held until the server is done with the files, not until the sender stops listening: one who
    // hangs up once the form is sent leaves its files in the inbox and the analysis, and must not free its place
    // for the next form. While the form is still arriving, an answer or a closed connection ends the upload; once
    // it has all arrived, the form reader's answer (its files written, or an error) does.
    let formRead = false;
    const formEnded = () => {
      if (!formRead && !req.complete) finished();
    };
    res.once('finish', formEnded);
    res.once('close', formEnded);
    upload(req, res, (err: unknown) => {
      formRead = true;
      if (!err) {
        uploadDoneBy.set(req, finished);
        return next();
      }
      finished();
      // The form reader has removed what it wrote of the files.
      releaseInbox(...(inboxHeldBy.get(req) ?? []));
      if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') {
        return next(
          new AppError(413, 'file_too_large', `A file is larger than the upload limit of ${mb} MB. Nothing was stored. Shorten the record on the instrument, or ask an administrator to raise the limit.`, {
            fields: [{ field: 'file', message: `larger than ${mb} MB` }],
            limitBytes: ctx.config.maxUploadBytes,
          }),
        );
      }
      if (err instanceof multer.MulterError && (err.code === 'LIMIT_FILE_COUNT' || (err.code === 'LIMIT_UNEXPECTED_FILE' && err.field === 'file'))) {
        return next(
          new AppError(400, 'too_many_files', `At most ${MAX_FILES_PER_UPLOAD} files can be uploaded at once. Nothing was stored.`, {
            fields: [{ field: 'file', message: `at most ${MAX_FILES_PER_UPLOAD} files` }],
          }),
        );
      }
      if (err instanceof multer.MulterError) return next(multerAppError(err));
      if (isMalformedMultipart(err)) return next(malformedMultipartError(err as Error));
      if (senderWentAway(err, req)) {
        // A phone that lost its signal mid-upload: everyday in the field, not a server fault. The part written is
        // already removed; the answer below reaches nobody but keeps the request's record straight.
        ctx.logger.info({ userId: req.user?.id, why: (err as Error).message }, 'upload-cut-off');
        return next(
          new AppError(400, 'upload_cut_off', 'The upload stopped before the whole form arrived (the connection was closed). Nothing was stored; send it again.'),
        );
      }
      next(err);
    });
  };
}

/** The form reader's own words for a sender that closed the connection before the form ended, or the socket's. */
function senderWentAway(err: unknown, req: Request): boolean {
  if (!(err instanceof Error)) return false;
  if (err.message === 'Request aborted' || err.message === 'Request closed') return true;
  const code = (err as NodeJS.ErrnoException).code;
  return req.destroyed && (code === 'ECONNRESET' || code === 'ECONNABORTED');
}

function duplicateWords(d: DuplicateFile) {
  return `${capMessage(d.originalName, 120)} was already uploaded for this run and end (trace ${d.traceId}, ${d.uploadedAt.slice(0, 16).replace('T', ' ')} UTC)`;
}

/** The answer to an upload, the same for its first try and any retry with the same key. */
async function uploadAnswer(ctx: AppContext, res: Response, outcome: traces.UploadOutcome): Promise<UploadResult> {
  const { duplicates, replayed } = outcome;
  if (replayed) res.setHeader('idempotent-replayed', 'true');
  if (!outcome.traceIds.length) {
    throw new AppError(
      409,
      'duplicate_upload',
      duplicates.length === 1
        ? `${duplicateWords(duplicates[0])}; it was not stored again. Archived traces do not count as earlier uploads.`
        : `All ${duplicates.length} files were already uploaded for this run and end; none was stored again. ${duplicates.map(duplicateWords).join('; ')}. Archived traces do not count as earlier uploads.`,
      { duplicates, replayed },
    );
  }
  const stored = await Promise.all(outcome.traceIds.map((id) => traces.getTrace(ctx, id)));
  const failed = stored.filter((t) => t.status === 'failed');
  if (failed.length === stored.length) {
    const first = failed[0];
    throw new AppError(
      422,
      'trace_unreadable',
      failed.length === 1
        ? `${first.originalName} could not be read: ${first.error?.message}. The file is kept (trace ${first.id}); no finding was made from it.`
        : `None of the ${failed.length} files could be read; they are kept, marked failed. ${failed.map((t) => `${t.originalName}: ${t.error?.message}`).join('; ')}`,
      {
        fields: failed.map((t) => ({ field: 'file', message: `${t.originalName}: ${t.error?.message}`, ...(t.error?.line ? { line: t.error.line } : {}) })),
        traces: stored,
        duplicates,
        replayed,
      },
    );
  }
  // Large files are analysed in the background: 202, and Location names the (first) trace to follow.
  const pending = stored.filter((t) => t.status === 'pending');
  if (pending.length) res.setHeader('location', `/api/traces/${pending[0].id}`);
  res.status(pending.length ? 202 : 201);
  return { traces: stored, duplicates, replayed };
}

export function traceRoutes(ctx: AppContext) {
  // A running server keeps an analysis worker ready; tests start theirs on the first upload.
  if (ctx.config.env !== 'test') analysisPool(ctx).warm();
  const r = new ApiRouter('/api/traces');
  r.get('/', 'traces:read', handle((req) => traces.listTraces(TraceListQuerySchema.parse(req.query))));
  r.post(
    '/',
    'traces:upload',
    uploadMiddleware(ctx),
    handle(async (req, res) => {
      const files = (req.files as Express.Multer.File[] | undefined) ?? [];
      try {
        const inForm = repeatedFieldError('form', req.body ?? {}) ?? textTrouble('form', req.body ?? {});
        if (inForm) throw inForm;
        const fields = TraceUploadSchema.parse(req.body ?? {});
        // The phone's summary is JSON text: "\u0000" and the like only appear once it is read.
        const inSummary = textTrouble('form', { deviceAnalysis: fields.deviceAnalysis });
        if (inSummary) throw inSummary;
        const key = idempotencyKey(req);
        if (!files.length) {
          throw AppError.badRequest('no_file', 'Choose at least one CSV trace file to upload.', { fields: [{ field: 'file', message: 'is required' }] });
        }
        const outcome = await traces.receiveUpload(
          ctx,
          fields,
          files.map((f) => ({ originalName: fileName(f), path: f.path })),
          currentUser(req).id,
          key,
        );
        return await uploadAnswer(ctx, res, outcome);
      } finally {
        await Promise.all(files.map((f) => fsp.rm(f.path, { force: true })));
        releaseInbox(...(inboxHeldBy.get(req) ?? []));
        uploadDoneBy.get(req)?.();
      }
    }),
  );
  r.get(
    '/:id',
    'traces:read',
    handle((req) => traces.getTrace(ctx, IdParam.parse(req.params).id, TraceViewQuerySchema.parse(req.query))),
  );
  r.get(
    '/:id/raw',
    'traces:read',
    handle(async (req, res) => {
      const raw = await traces.rawFile(ctx, IdParam.parse(req.params).id);
      try {
        const { size } = await fsp.stat(raw.path);
        res.set({
          'content-type': 'text/csv; charset=utf-8',
          'content-length': String(size),
          'content-disposition': `attachment; filename="${raw.name.replace(/[^\w.\- ]/g, '_')}"`,
          'x-content-sha256': raw.sha256,
        });
        // Checked against its SHA-256 before the first byte goes out, then sent as the client takes it: a slow or
        // stalled reader holds a small buffer of the server's memory, not the whole file.
        await pipeline(fs.createReadStream(raw.path), res).catch((err: unknown) => {
          // The client went away mid-file: nothing to answer. Before the first byte, the error is answered as usual.
          if (!res.headersSent) throw err;
        });
      } finally {
        await raw.release();
      }
      return undefined;
    }),
  );
  r.post(
    '/:id/reanalyse',
    'traces:upload',
    handle(async (req, res) => {
      const done = await traces.reanalyseTrace(ctx, IdParam.parse(req.params).id, currentUser(req));
      res.status(done.created ? 201 : 200);
      return traces.getTrace(ctx, done.id);
    }),
  );
  r.put(
    '/:id/reference',
    'traces:reference',
    handle(async (req) => {
      const id = IdParam.parse(req.params).id;
      await traces.setReference(ctx.sequelize, id, ReferenceSchema.parse(req.body).isReference);
      return traces.getTrace(ctx, id);
    }),
  );
  return r;
}

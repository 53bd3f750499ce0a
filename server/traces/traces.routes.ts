import path from 'node:path';
import { IdParam } from '../http/params';
import multer from 'multer';
import type { RequestHandler } from 'express';
import { ReferenceSchema, TraceListQuerySchema, TraceUploadSchema, TraceViewQuerySchema } from '../../shared/schemas/traces';
import { currentUser } from '../auth/guards';
import type { AppContext } from '../context';
import { AppError } from '../errors';
import { ApiRouter, handle } from '../http/api-router';
import * as traces from './traces.service';

export const MAX_FILES_PER_UPLOAD = 10;
const CSV_TYPES = new Set(['text/csv', 'text/plain', 'application/csv', 'application/vnd.ms-excel', 'application/octet-stream', 'text/comma-separated-values', '']);

function uploadMiddleware(ctx: AppContext): RequestHandler {
  const mb = Math.round((ctx.config.maxUploadBytes / 1024 / 1024) * 10) / 10;
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: ctx.config.maxUploadBytes, files: MAX_FILES_PER_UPLOAD, fields: 20, fieldSize: 2048 },
    fileFilter: (_req, file, cb) => {
      const ext = path.extname(file.originalname).toLowerCase();
      if (ext !== '.csv' || !CSV_TYPES.has(file.mimetype)) {
        return cb(
          new AppError(415, 'wrong_file_type', `"${file.originalname}" is not a CSV file. Export the trace from the instrument as CSV (.csv) and upload that.`, {
            fields: [{ field: 'file', message: `${file.originalname}: only .csv files are accepted` }],
          }),
        );
      }
      cb(null, true);
    },
  }).array('file', MAX_FILES_PER_UPLOAD);
  return (req, res, next) =>
    upload(req, res, (err: unknown) => {
      if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') {
        return next(
          new AppError(413, 'file_too_large', `A file is larger than the upload limit of ${mb} MB. Nothing was stored. Shorten the record on the instrument, or ask an administrator to raise the limit.`, {
            fields: [{ field: 'file', message: `larger than ${mb} MB` }],
            limitBytes: ctx.config.maxUploadBytes,
          }),
        );
      }
      if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_COUNT') {
        return next(
          new AppError(400, 'too_many_files', `At most ${MAX_FILES_PER_UPLOAD} files can be uploaded at once. Nothing was stored.`, {
            fields: [{ field: 'file', message: `at most ${MAX_FILES_PER_UPLOAD} files` }],
          }),
        );
      }
      next(err);
    });
}

export function traceRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/traces');
  r.get('/', 'traces:read', handle((req) => traces.listTraces(TraceListQuerySchema.parse(req.query))));
  r.post(
    '/',
    'traces:upload',
    uploadMiddleware(ctx),
    handle(async (req, res) => {
      const fields = TraceUploadSchema.parse(req.body ?? {});
      const files = (req.files as Express.Multer.File[] | undefined) ?? [];
      if (!files.length) {
        throw AppError.badRequest('no_file', 'Choose at least one CSV trace file to upload.', { fields: [{ field: 'file', message: 'is required' }] });
      }
      const ids = await traces.storeTraces(
        ctx,
        fields,
        files.map((f) => ({ originalName: Buffer.from(f.originalname, 'latin1').toString('utf8'), bytes: f.buffer })),
        currentUser(req).id,
      );
      const stored = await Promise.all(ids.map((id) => traces.getTrace(ctx, id)));
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
          },
        );
      }
      res.status(201);
      return { traces: stored };
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
      res.setHeader('content-type', 'text/csv; charset=utf-8');
      res.setHeader('content-disposition', `attachment; filename="${raw.name.replace(/[^\w.\- ]/g, '_')}"`);
      res.setHeader('x-content-sha256', raw.sha256);
      res.send(raw.bytes);
      return undefined;
    }),
  );
  r.post(
    '/:id/reanalyse',
    'traces:upload',
    handle(async (req, res) => {
      const id = await traces.reanalyseTrace(ctx, IdParam.parse(req.params).id, currentUser(req).id);
      res.status(201);
      return traces.getTrace(ctx, id);
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

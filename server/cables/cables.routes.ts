import multer from 'multer';
import { IdParam } from '../http/params';
import { textInt } from '../../shared/schemas/input';
import type { Request, RequestHandler } from 'express';
import { z } from 'zod';
import { CableListQuerySchema, CableTypeInputSchema, CableTypeUpdateSchema, reasonSchema } from '../../shared/schemas/cables';
import { currentUser } from '../auth/guards';
import { calibrationsForCable } from '../calibrations/calibrations.service';
import { AppError } from '../errors';
import { ApiRouter, handle } from '../http/api-router';
import { refuseBadFormText, uploadedFileName } from '../http/strict-input';
import { commitImport, csvFileText, exportCsv, previewImport } from './cables.csv';
import * as cables from './cables.service';

// Strict, as every other body and query: a misspelt field or parameter is refused by name rather than dropped. The
// CSV comes as the "file" part of a form, or as the JSON body's csv (read by csvText).
const HistoryQuery = z.strictObject({ sinceRevision: textInt({ min: 0, what: 'a revision number' }).optional() });
const PreviewBody = z.strictObject({ csv: z.unknown().optional() });
const CommitBody = z.strictObject({ reason: reasonSchema, csv: z.unknown().optional() });

export const MAX_IMPORT_BYTES = 1024 * 1024;

/** The CSV from a multipart field "file", or from a JSON body { csv }. */
function csvText(req: Request): { text: string; fileName?: string } {
  if (req.file) return { text: csvFileText(req.file.buffer), fileName: uploadedFileName(req.file.originalname) };
  const csv = (req.body as { csv?: unknown } | undefined)?.csv;
  if (typeof csv === 'string' && csv.length > 0) return { text: csv };
  throw AppError.badRequest('file_missing', 'Attach the CSV file (form field "file").', { fields: [{ field: 'file', message: 'is required' }] });
}

export function cableRoutes() {
  const r = new ApiRouter('/api/cables');
  // The whole form is held in memory: a file of at most 1 MiB and a few short text fields (the reason is at most 2000 characters).
  const upload: RequestHandler = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: MAX_IMPORT_BYTES, files: 1, fields: 5, fieldSize: 16 * 1024, parts: 6, headerPairs: 200 },
  }).single('file');

  r.get('/', 'cables:read', handle((req) => cables.listCables(CableListQuerySchema.parse(req.query))));
  r.get(
    '/export',
    'cables:read',
    handle(async (_req, res) => {
      const csv = await exportCsv();
      res
        .type('text/csv; charset=utf-8')
        .attachment(`cable-library-${new Date().toISOString().slice(0, 10)}.csv`)
        .send(csv);
    }),
  );
  r.post(
    '/import/preview',
    'cables:write',
    upload,
    refuseBadFormText,
    handle((req) => {
      PreviewBody.parse(req.body ?? {});
      return previewImport(csvText(req).text);
    }),
  );
  r.post(
    '/import',
    'cables:write',
    upload,
    refuseBadFormText,
    handle((req) => {
      const { reason } = CommitBody.parse(req.body ?? {});
      const { text, fileName } = csvText(req);
      return commitImport(text, { reason, userId: currentUser(req).id, fileName });
    }),
  );
  r.post(
    '/',
    'cables:write',
    handle(async (req, res) => {
      const input = CableTypeInputSchema.parse(req.body);
      const created = await cables.createCable(input, { userId: currentUser(req).id });
      res.status(201);
      return created;
    }),
  );
  r.get('/:id', 'cables:read', handle((req) => cables.getCable(IdParam.parse(req.params).id)));
  r.patch(
    '/:id',
    'cables:write',
    handle(async (req) => {
      const { id } = IdParam.parse(req.params);
      const input = CableTypeUpdateSchema.parse(req.body);
      return (await cables.updateCable(id, input, { userId: currentUser(req).id })).cable;
    }),
  );
  r.get(
    '/:id/history',
    'cables:read',
    handle((req) => cables.history(IdParam.parse(req.params).id, HistoryQuery.parse(req.query))),
  );
  r.get('/:id/calibrations', 'cables:read', handle((req) => calibrationsForCable(IdParam.parse(req.params).id)));
  return r;
}

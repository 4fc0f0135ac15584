// Bench captures (uploads, preview, fit) and the parts library (CRUD, CSV), plus apply-part on a
// design. :captureId and :partId find their resource's team like the other resource parameters, so
// another team's capture or part answers 404 and nothing is written.
import express, { Router, type Request, type RequestHandler } from 'express';
import multer from 'multer';
import { eq } from 'drizzle-orm';
import { z } from 'zod';
import { benchCaptures, componentParts } from '../../db/schema';
import { ALL_ROLES, actor, bindResourceParams, currentTeam, isUuid, requireRole, resourceId } from '../auth/middleware';
import type { AppContext } from '../context';
import { HttpError, badRequest, notFound, unauthorized } from '../errors';
import { CAPTURE_MAX_BYTES, CaptureError, FIT_PARAMS, PART_KINDS, PART_SLOT_KEYS, parseCaptureFile, partsExport, partsTemplate, previewOf } from '../services/bench';
import { createCapture, deleteCapture, fitStoredCapture, getCapture, listCaptures } from '../services/captures';
import {
  allParts,
  applyPartToDraft,
  createPart,
  designPartRefs,
  importParts,
  listParts,
  partRow,
  setArchived,
  shapePart,
  updatePart,
} from '../services/parts';

const ALLOWED_EXTENSIONS = /\.(csv|tsv|txt)$/i;
// Spreadsheet programs on Windows label CSV as application/vnd.ms-excel; anything else must be text.
const ALLOWED_TYPE = (type: string) => type.startsWith('text/') || type === 'application/vnd.ms-excel';

const upload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: CAPTURE_MAX_BYTES, files: 1, fields: 10, fieldSize: 64 * 1024 },
  fileFilter: (_req, file, callback) => {
    if (!ALLOWED_EXTENSIONS.test(file.originalname))
      return callback(new HttpError(400, 'unsupported_file', 'Upload a .csv, .tsv or .txt file.', [{ path: 'file', message: 'must end in .csv, .tsv or .txt' }]));
    if (!ALLOWED_TYPE(file.mimetype))
      return callback(new HttpError(400, 'unsupported_file', `A ${file.mimetype} file is not a text capture.`, [{ path: 'file', message: 'must be a text file' }]));
    callback(null, true);
  },
});

/** multer with its errors in the common shape (too large → 413). */
function singleFile(field: string): RequestHandler {
  const handler = upload.single(field);
  return (req, res, next) => {
    handler(req, res, (error: unknown) => {
      if (!error) return next();
      if (error instanceof multer.MulterError) {
        if (error.code === 'LIMIT_FILE_SIZE')
          return next(new HttpError(413, 'file_too_large', `The file is larger than ${CAPTURE_MAX_BYTES / 1024 / 1024} MB.`, [{ path: field, message: 'too large' }]));
        return next(badRequest(`The upload could not be read: ${error.message}.`, [{ path: error.field ?? field, message: error.message }]));
      }
      next(error);
    });
  };
}

function captureErrorBody(error: CaptureError) {
  return {
    error: {
      code: error.code,
      message: error.message,
      line: error.line ?? null,
      column: error.column ?? null,
      fields: [{ path: 'file', message: error.message }],
    },
  };
}

/** Runs a handler, answering a CaptureError with 400 and where in the file it is. */
function withCaptureErrors(handler: RequestHandler): RequestHandler {
  return async (req, res, next) => {
    try {
      await handler(req, res, next);
    } catch (error) {
      if (error instanceof CaptureError) {
        res.status(400).json(captureErrorBody(error));
        return;
      }
      next(error);
    }
  };
}

const parseOptionsSchema = z
  .strictObject({
    delimiter: z.enum(['auto', ',', ';', '\t']).optional(),
    decimal: z.enum(['auto', '.', ',']).optional(),
    hasHeader: z.union([z.literal('auto'), z.boolean()]).optional(),
    timeOffset: z.number().finite().optional(),
  })
  .default({});

/** A multipart text field holding JSON. */
function jsonField(req: Request, name: string): unknown {
  const raw: unknown = (req.body as Record<string, unknown> | undefined)?.[name];
  if (raw === undefined || raw === '') return undefined;
  if (typeof raw !== 'string') return raw;
  try {
    return JSON.parse(raw);
  } catch {
    throw badRequest(`${name} is not valid JSON.`, [{ path: name, message: 'must be JSON' }]);
  }
}

function fileOf(req: Request): Express.Multer.File {
  if (!req.file) throw badRequest('Attach the capture file (field "file").', [{ path: 'file', message: 'required' }]);
  return req.file;
}

const fitRequestSchema = z.strictObject({
  quantity: z.enum(['capacitorVoltage', 'busVoltage', 'current']),
  params: z.array(z.enum(FIT_PARAMS as unknown as [string, ...string[]])).min(1).max(6).optional(),
  offset: z.number().finite().optional(),
  start: z.number().finite().optional(),
  end: z.number().finite().optional(),
  refine: z.boolean().optional(),
});

const listPartsQuerySchema = z.object({
  search: z.string().max(100).optional(),
  kind: z.enum(PART_KINDS).optional(),
  archived: z
    .enum(['true', 'false'])
    .transform((v) => v === 'true')
    .optional(),
  cursor: z.string().max(500).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(100),
});

const applyPartSchema = z.strictObject({
  slot: z.enum(PART_SLOT_KEYS as unknown as [string, ...string[]]),
  partId: z.uuid(),
});

const csvBody = express.text({ type: ['text/csv', 'text/plain', 'text/tab-separated-values'], limit: '5mb' });

export function benchRouter(ctx: AppContext): Router {
  const router = Router();
  bindResourceParams(router, ctx);
  const teamParam = (name: string, table: typeof benchCaptures | typeof componentParts, message: string) =>
    router.param(name, async (req, _res, next, value: unknown) => {
      try {
        if (!req.auth) return next(unauthorized());
        if (!isUuid(value)) return next(notFound(message));
        const [row] = await ctx.db.select({ teamId: table.teamId }).from(table).where(eq(table.id, value));
        if (!row) return next(notFound(message));
        req.resource = { type: name.replace(/Id$/, ''), id: value, teamId: row.teamId, notFoundMessage: message };
        next();
      } catch (error) {
        next(error);
      }
    });
  teamParam('captureId', benchCaptures, 'No such capture.');
  teamParam('partId', componentParts, 'No such part.');

  // ---- captures ----
  router.post(
    '/captures/preview',
    requireRole('engineer'),
    singleFile('file'),
    withCaptureErrors(async (req, res) => {
      const file = fileOf(req);
      const options = parseOptionsSchema.parse(jsonField(req, 'options'));
      res.json({ fileName: file.originalname, byteSize: file.size, ...previewOf(parseCaptureFile(file.buffer, options)) });
    }),
  );

  router.post(
    '/designs/:designId/captures',
    requireRole('engineer'),
    singleFile('file'),
    withCaptureErrors(async (req, res) => {
      const file = fileOf(req);
      const options = parseOptionsSchema.parse(jsonField(req, 'options'));
      const mapping = jsonField(req, 'mapping');
      if (mapping === undefined) throw badRequest('Send the column mapping (field "mapping").', [{ path: 'mapping', message: 'required' }]);
      const name = z.string().max(200).optional().parse((req.body as Record<string, unknown>)?.name) ?? '';
      const created = await createCapture(ctx, currentTeam(req).id, resourceId(req), actor(req).id, {
        name: name.trim(),
        fileName: file.originalname,
        contentType: file.mimetype,
        bytes: file.buffer,
        options,
        mapping,
      });
      res.status(201).json(created);
    }),
  );

  router.get('/designs/:designId/captures', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await listCaptures(ctx, currentTeam(req).id, resourceId(req)));
  });

  router.get('/captures/:captureId', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await getCapture(ctx, currentTeam(req).id, resourceId(req)));
  });

  router.delete('/captures/:captureId', requireRole('engineer'), async (req, res) => {
    await deleteCapture(ctx, currentTeam(req).id, resourceId(req));
    res.status(204).end();
  });

  router.post(
    '/captures/:captureId/fit',
    requireRole('engineer'),
    withCaptureErrors(async (req, res) => {
      const body = fitRequestSchema.parse(req.body ?? {});
      res.json(await fitStoredCapture(ctx, currentTeam(req).id, resourceId(req), body));
    }),
  );

  // ---- parts ----
  router.get('/parts', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await listParts(ctx, currentTeam(req).id, listPartsQuerySchema.parse(req.query)));
  });

  router.get('/parts/template.csv', requireRole(...ALL_ROLES), (_req, res) => {
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', 'attachment; filename="ringwell-parts-template.csv"');
    res.send(partsTemplate());
  });

  router.get('/parts/export.csv', requireRole(...ALL_ROLES), async (req, res) => {
    const includeArchived = req.query.archived === 'true';
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', 'attachment; filename="ringwell-parts.csv"');
    res.send(partsExport(await allParts(ctx, currentTeam(req).id, includeArchived)));
  });

  router.post('/parts/import', requireRole('admin', 'engineer'), singleFile('file'), csvBody, async (req, res) => {
    const validOnly = req.query.validOnly === 'true';
    let input: string | Uint8Array;
    if (req.file) input = req.file.buffer;
    else if (typeof req.body === 'string' && req.body.length > 0) input = req.body;
    else throw badRequest('Send the CSV as the body (text/csv) or as the file field of a form.', [{ path: 'file', message: 'required' }]);
    const result = await importParts(ctx, currentTeam(req).id, actor(req).id, input, validOnly);
    res.status(result.errors.length > 0 && !validOnly ? 422 : 200).json(result);
  });

  router.post('/parts', requireRole('admin', 'engineer'), async (req, res) => {
    res.status(201).json(await createPart(ctx, currentTeam(req).id, actor(req).id, req.body));
  });

  router.get('/parts/:partId', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(shapePart(await partRow(ctx, currentTeam(req).id, resourceId(req))));
  });

  router.patch('/parts/:partId', requireRole('admin', 'engineer'), async (req, res) => {
    if (!req.body || typeof req.body !== 'object' || Array.isArray(req.body)) throw badRequest('Send the fields to change as a JSON object.');
    res.json(await updatePart(ctx, currentTeam(req).id, resourceId(req), req.body as Record<string, unknown>));
  });

  router.post('/parts/:partId/archive', requireRole('admin', 'engineer'), async (req, res) => {
    res.json(await setArchived(ctx, currentTeam(req).id, resourceId(req), true));
  });

  router.post('/parts/:partId/unarchive', requireRole('admin', 'engineer'), async (req, res) => {
    res.json(await setArchived(ctx, currentTeam(req).id, resourceId(req), false));
  });

  // ---- a design taking a part ----
  router.get('/designs/:designId/part-refs', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await designPartRefs(ctx, currentTeam(req).id, resourceId(req)));
  });

  router.post('/designs/:designId/apply-part', requireRole('engineer'), async (req, res) => {
    const body = applyPartSchema.parse(req.body);
    res.json(await applyPartToDraft(ctx, currentTeam(req).id, resourceId(req), body.slot, body.partId));
  });

  return router;
}

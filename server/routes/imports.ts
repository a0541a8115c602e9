import crypto from 'node:crypto';
import os from 'node:os';
import path from 'node:path';
import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { z } from 'zod';
import {
  batchQuerySchema,
  dateFormatSchema,
  saveMappingSchema,
  uploadOptionsSchema,
  type SavedMapping,
} from '../../shared/schemas/imports';
import { accessOf, requireAccess } from '../auth/access';
import type { AppContext } from '../context';
import { HttpError, notFound } from '../http/errors';
import { parseWith } from '../http/validate';
import { toBatchIssue } from '../imports/api-batch';
import { progressReporter, streamProgress, JOB_ID } from '../imports/progress';
import { BatchRefused, discardImport, importBatch, importView, listImports, MAX_UPLOAD_BYTES, takeUpload } from '../imports/service';
import { deleteMapping, listMappings, saveMapping, type MappingRow } from '../services/import-mappings';

const uploadFolder = path.join(os.tmpdir(), 'panelwise-uploads');

const upload = multer({
  storage: multer.diskStorage({
    destination: uploadFolder,
    filename: (_req, _file, cb) => cb(null, `${Date.now()}-${crypto.randomBytes(8).toString('hex')}.upload`),
  }),
  limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 10, fieldSize: 256 * 1024 },
}).single('file');

/** Receives the one file of a multipart upload, with a clear refusal of a file over 50 MB. */
const receiveFile: RequestHandler = (req, res, next) => {
  import('node:fs')
    .then((fs) => fs.promises.mkdir(uploadFolder, { recursive: true }))
    .then(() =>
      upload(req, res, (error: unknown) => {
        if (!error) return next();
        if (error instanceof multer.MulterError) {
          if (error.code === 'LIMIT_FILE_SIZE') {
            return next(
              new HttpError(
                413,
                'payload_too_large',
                'The file is larger than 50 MB: split it into smaller files, or send the assessments through the batch API',
              ),
            );
          }
          return next(
            new HttpError(400, 'bad_request', `The upload is not valid: ${error.message}${error.field ? ` (field ${error.field})` : ''}`),
          );
        }
        next(error);
      }),
    )
    .catch(next);
};

const importIdParam = z.coerce.number().int().positive();
const mappingIdParam = z.coerce.number().int().positive();

function idOf(raw: unknown, what: string): number {
  const r = importIdParam.safeParse(raw);
  if (!r.success) throw notFound(what);
  return r.data;
}

function jobOf(query: unknown): string | undefined {
  const job = (query as Record<string, unknown>).job;
  return typeof job === 'string' && JOB_ID.test(job) ? job : undefined;
}

const truthy = (v: string | undefined) => v === 'true' || v === '1';

/** The multipart fields beside the file: mapping (JSON), dateFormat, addClassifiers. */
function uploadOptions(body: unknown) {
  const fields = (body ?? {}) as Record<string, string | undefined>;
  let mapping: unknown;
  if (fields.mapping !== undefined && fields.mapping !== '') {
    try {
      mapping = JSON.parse(fields.mapping);
    } catch {
      throw new HttpError(400, 'validation_failed', 'The mapping is not valid JSON', [{ path: 'mapping', message: 'is not JSON' }]);
    }
  }
  return parseWith(
    uploadOptionsSchema,
    {
      mapping,
      dateFormat: fields.dateFormat || undefined,
      addClassifiers: fields.addClassifiers === undefined ? undefined : truthy(fields.addClassifiers),
    },
    'upload',
  );
}

function mappingView(row: MappingRow): SavedMapping {
  return {
    id: row.id,
    name: row.name,
    layout: row.layout,
    mapping: JSON.parse(row.mapping) as SavedMapping['mapping'],
    dateFormat: dateFormatSchema.catch('iso').parse(row.date_format),
    updatedAt: row.updated_at,
  };
}

/**
 * Imports of panel decisions, for the federation's leads: dry run of an uploaded CSV, commit,
 * revert, history, saved column mappings, progress as server-sent events; and the batch API
 * for federations' own systems (a lead, or an API token with the import scope).
 */
export function importsRouter(ctx: AppContext): Router {
  const router = Router();
  const leads = requireAccess(ctx, { roles: ['lead'] });
  const base = '/federations/:federation';

  router.get(`${base}/imports`, leads, (req, res) => {
    const { federation } = accessOf(req);
    res.json({ imports: listImports(ctx, federation.id) });
  });

  router.post(`${base}/imports`, leads, receiveFile, async (req, res) => {
    const { federation, userId } = accessOf(req);
    const file = req.file;
    if (!file) {
      throw new HttpError(400, 'bad_request', 'Send the CSV as multipart/form-data in a field named "file"');
    }
    let bytes: Uint8Array;
    let options: ReturnType<typeof uploadOptions>;
    try {
      options = uploadOptions(req.body);
    } finally {
      bytes = await takeUpload(file.path);
    }
    const progress = progressReporter(federation.id, userId, jobOf(req.query));
    try {
      const name = Buffer.from(file.originalname, 'latin1').toString('utf8').slice(0, 200) || null;
      // Reading, checking and comparing the file is heavy: it runs in the worker pool.
      const result = await ctx.pool.run(
        'imports.dry-run',
        { federation, userId, file: { bytes, name }, options },
        { federationId: federation.id, onProgress: progress.report },
      );
      progress.finish('done');
      res.json(result);
    } catch (error) {
      progress.finish('failed', 'The file could not be checked');
      throw error;
    }
  });

  router.get(`${base}/imports/:importId`, leads, (req, res) => {
    const { federation } = accessOf(req);
    res.json(importView(ctx, federation.id, idOf(req.params.importId, 'The import')));
  });

  router.post(`${base}/imports/:importId/commit`, leads, async (req, res) => {
    const { federation, userId } = accessOf(req);
    const progress = progressReporter(federation.id, userId, jobOf(req.query));
    try {
      const importId = idOf(req.params.importId, 'The import');
      const body = (req.body ?? {}) as { confirmAthleteChanges?: unknown };
      const view = await ctx.pool.run(
        'imports.commit',
        { federation, userId, importId, confirmAthleteChanges: body.confirmAthleteChanges === true },
        { federationId: federation.id, onProgress: progress.report },
      );
      progress.finish('done');
      res.json(view);
    } catch (error) {
      progress.finish('failed', error instanceof HttpError ? error.message : 'The import was not written');
      throw error;
    }
  });

  router.post(`${base}/imports/:importId/revert`, leads, async (req, res) => {
    const { federation, userId } = accessOf(req);
    const progress = progressReporter(federation.id, userId, jobOf(req.query));
    try {
      const importId = idOf(req.params.importId, 'The import');
      const view = await ctx.pool.run(
        'imports.revert',
        { federation, userId, importId },
        { federationId: federation.id, onProgress: progress.report },
      );
      progress.finish('done');
      res.json(view);
    } catch (error) {
      progress.finish('failed', error instanceof HttpError ? error.message : 'The import was not reverted');
      throw error;
    }
  });

  router.delete(`${base}/imports/:importId`, leads, async (req, res) => {
    const { federation, userId } = accessOf(req);
    await discardImport(ctx, federation, userId, idOf(req.params.importId, 'The import'));
    res.status(204).end();
  });

  router.get(`${base}/import-jobs/:job/events`, leads, (req, res) => {
    const { federation, userId } = accessOf(req);
    const job = String(req.params.job);
    if (!JOB_ID.test(job)) throw new HttpError(400, 'bad_request', 'A job id is 8 to 64 letters, digits, - or _');
    streamProgress(res, federation.id, userId, job);
  });

  router.get(`${base}/import-mappings`, leads, async (req, res) => {
    res.json({ mappings: (await listMappings(ctx, accessOf(req).federation.id)).map(mappingView) });
  });

  router.post(`${base}/import-mappings`, leads, async (req, res) => {
    const { federation, userId } = accessOf(req);
    const input = parseWith(saveMappingSchema, req.body);
    const { row, created } = await saveMapping(ctx, federation.id, userId, input);
    res.status(created ? 201 : 200).json(mappingView(row));
  });

  router.delete(`${base}/import-mappings/:mappingId`, leads, async (req, res) => {
    const { federation, userId } = accessOf(req);
    const id = mappingIdParam.safeParse(req.params.mappingId);
    if (!id.success || !(await deleteMapping(ctx, federation.id, userId, id.data))) throw notFound('The saved mapping');
    res.status(204).end();
  });

  router.post('/v1/federations/:federation/assessments', requireAccess(ctx, { roles: ['lead'], tokenScopes: ['import'] }), (req, res) => {
    const { federation, userId } = accessOf(req);
    const query = parseWith(batchQuerySchema, req.query, 'query');
    try {
      const result = importBatch(ctx, federation, userId, req.body, {
        dryRun: truthy(query.dryRun),
        addClassifiers: truthy(query.addClassifiers),
      });
      res.status(result.status).json(result.body);
    } catch (error) {
      if (error instanceof BatchRefused) {
        throw new HttpError(
          422,
          'validation_failed',
          `The batch was refused and nothing was written: ${error.issues.errorCount} problem(s)`,
          {
            errorCount: error.issues.errorCount,
            errors: error.issues.errors.map(toBatchIssue),
          },
        );
      }
      throw error;
    }
  });

  return router;
}

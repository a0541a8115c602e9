import fs from 'node:fs';
import { pipeline } from 'node:stream/promises';
import zlib from 'node:zlib';
import { Router } from 'express';
import { z } from 'zod';
import { createStudySchema, exportFileSchema, exportRequestSchema, exportSettingsSchema } from '../../shared/schemas/exports';
import { accessOf, requireAccess } from '../auth/access';
import type { AppContext } from '../context';
import { closeStudy, createStudy, exportFile, exportOptions, listMyExports, settingsView, updateSettings } from '../exports/service';
import { parseWith } from '../http/validate';

const idParam = z.coerce.number().int().positive();

/**
 * Anonymised research exports. Leads and researchers of the federation only; classifiers and API
 * tokens never (no token scope is allowed). Settings (k) and studies are the lead's.
 */
export function exportsRouter(ctx: AppContext): Router {
  const router = Router();
  const exporters = requireAccess(ctx, { roles: ['lead', 'researcher'] });
  const leads = requireAccess(ctx, { roles: ['lead'] });

  router.get('/federations/:federation/exports/options', exporters, async (req, res) => {
    res.json(await exportOptions(ctx.db, accessOf(req)));
  });

  router.get('/federations/:federation/exports', exporters, async (req, res) => {
    res.json(await listMyExports(ctx, accessOf(req)));
  });

  router.post('/federations/:federation/exports', exporters, async (req, res) => {
    const body = parseWith(exportRequestSchema, req.body, 'export request');
    const access = accessOf(req);
    // Reading the scope and building the files is heavy: it runs in the worker pool.
    res.status(201).json(await ctx.pool.run('exports.create', { access, request: body }, { federationId: access.federation.id }));
  });

  router.get('/federations/:federation/exports/settings', leads, async (req, res) => {
    res.json(await settingsView(ctx.db, accessOf(req).federation.id));
  });

  router.put('/federations/:federation/exports/settings', leads, async (req, res) => {
    const body = parseWith(exportSettingsSchema, req.body, 'export settings');
    res.json(await updateSettings(ctx.db, accessOf(req), body));
  });

  router.post('/federations/:federation/exports/studies', leads, async (req, res) => {
    const body = parseWith(createStudySchema, req.body, 'study');
    res.status(201).json(await createStudy(ctx.db, accessOf(req), body));
  });

  router.post('/federations/:federation/exports/studies/:studyId/close', leads, async (req, res) => {
    const studyId = parseWith(idParam, req.params.studyId, 'study id');
    res.json(await closeStudy(ctx.db, accessOf(req), studyId));
  });

  router.get('/federations/:federation/exports/:exportId/:file', exporters, async (req, res) => {
    const exportId = parseWith(idParam, req.params.exportId, 'export id');
    const file = parseWith(exportFileSchema, req.params.file, 'file');
    const found = await exportFile(ctx, accessOf(req), exportId, file);
    // Streamed from the gzip-compressed file: as it is to a client that accepts gzip, else unpacked on the way.
    const gzip = req.acceptsEncodings('gzip', 'identity') === 'gzip';
    res
      .status(200)
      .type(found.mediaType)
      .set('content-disposition', `attachment; filename="${found.fileName}"`)
      .set('cache-control', 'private, no-store')
      .set('vary', 'Accept-Encoding');
    if (gzip) res.set('content-encoding', 'gzip').set('content-length', String(found.gzipBytes));
    const source = fs.createReadStream(found.gzipPath);
    await pipeline(gzip ? [source, res] : [source, zlib.createGunzip(), res]);
  });

  return router;
}

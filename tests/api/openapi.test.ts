/**
 * The OpenAPI 3.1 document at GET /api/openapi.json: generated from the zod schemas, and every
 * route of the Express router is described in it completely — request and response schemas —
 * so a route nobody described, or described without schemas, fails here.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { Router } from 'express';
import { z } from 'zod';
import { apiRouteDocs, apiRouter } from '../../server/routes/index';
import { ApiDescription, missingSchemas, openApiPath, type RouteDoc } from '../../server/openapi/registry';
import { routesOf } from '../helpers/router-routes';
import { createTestApp, type TestApp } from '../helpers/test-app';

/** The routes of `router` (mounted under /api) whose description is missing or incomplete. */
function incompleteRoutes(router: Router, description: ApiDescription): string[] {
  const out: string[] = [];
  for (const r of routesOf(router)) {
    const path = `/api${r.path}`;
    const doc = description.get(r.method, path);
    if (!doc) out.push(`${r.method.toUpperCase()} ${path} is not described`);
    else if (missingSchemas(doc).length > 0) out.push(`${r.method.toUpperCase()} ${path} lacks ${missingSchemas(doc).join(', ')}`);
  }
  return out;
}

let t: TestApp;
let doc: { openapi: string; paths: Record<string, Record<string, Record<string, unknown>>>; components: Record<string, unknown> };

beforeAll(async () => {
  t = await createTestApp({ seed: 'none' });
  const res = await request(t.app).get('/api/openapi.json').expect(200);
  doc = res.body;
});
afterAll(() => t.close());

describe('OpenAPI document', () => {
  it('is OpenAPI 3.1 with JSON Schema 2020-12 and the two ways to authenticate', () => {
    expect(doc.openapi).toBe('3.1.0');
    expect(doc).toMatchObject({ jsonSchemaDialect: 'https://json-schema.org/draft/2020-12/schema' });
    expect(Object.keys((doc.components as { securitySchemes: object }).securitySchemes)).toEqual(['session', 'bearer']);
  });

  it('describes every route of the Express router', () => {
    const routes = routesOf(apiRouter(t.ctx)).map((r) => ({
      method: r.method,
      path: openApiPath(`/api${r.path}`),
    }));
    expect(routes.length).toBeGreaterThan(10);
    const missing = routes.filter((r) => !doc.paths[r.path]?.[r.method]).map((r) => `${r.method.toUpperCase()} ${r.path}`);
    expect(missing, 'describe these routes in their feature’s server/routes/<feature>.openapi.ts').toEqual([]);
  });

  it('describes every route completely: a schema for each answer with a body, and for each write its body', () => {
    expect(incompleteRoutes(apiRouter(t.ctx), new ApiDescription(apiRouteDocs))).toEqual([]);
  });

  it('fails for a route whose description lacks schemas, and for a route with none', () => {
    const router = Router();
    router.post('/federations/:federation/lint-case', (_req, res) => res.json({}));
    router.get('/federations/:federation/undescribed', (_req, res) => res.json({}));
    const description = new ApiDescription([
      {
        method: 'post',
        path: '/api/federations/:federation/lint-case',
        summary: 'A write described without schemas',
        security: { session: true },
        responses: { 200: { description: 'Done' } },
      },
    ]);
    expect(incompleteRoutes(router, description)).toEqual([
      'POST /api/federations/:federation/lint-case lacks a schema for the 200 response, a request body schema (or noBody: true)',
      'GET /api/federations/:federation/undescribed is not described',
    ]);
    const complete: RouteDoc = {
      method: 'post',
      path: '/api/federations/:federation/lint-case',
      summary: 'The same write, described',
      security: { session: true },
      body: { schema: z.object({ name: z.string() }) },
      responses: { 200: { description: 'Done', schema: z.object({ ok: z.boolean() }) } },
    };
    expect(missingSchemas(complete)).toEqual([]);
  });

  it('has the batch API with its request schema from zod, its token scope and its refusal', () => {
    const op = doc.paths['/api/v1/federations/{federation}/assessments'].post;
    expect(op.security).toEqual([{ session: [] }, { bearer: ['import'] }]);
    const body = (
      op.requestBody as {
        content: Record<string, { schema: { type: string; items: { required: string[]; properties: Record<string, unknown> } } }>;
      }
    ).content['application/json'].schema;
    expect(body.type).toBe('array');
    expect(body.items.required).toEqual(expect.arrayContaining(['assessment_id', 'athlete_code', 'event_code', 'assessed_on', 'ratings']));
    expect(Object.keys(op.responses as object)).toEqual(expect.arrayContaining(['200', '201', '401', '403', '422']));
    const params = op.parameters as { name: string; in: string }[];
    expect(params).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ name: 'federation', in: 'path' }),
        expect.objectContaining({ name: 'dryRun', in: 'query' }),
      ]),
    );
  });

  it('describes the upload as multipart with a binary file', () => {
    const op = doc.paths['/api/federations/{federation}/imports'].post;
    const content = (op.requestBody as { content: Record<string, { schema: { properties: { file: { format: string } } } }> }).content;
    expect(content['multipart/form-data'].schema.properties.file.format).toBe('binary');
  });
});

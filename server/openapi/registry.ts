/**
 * The OpenAPI 3.1 description of the API, generated from the zod schemas the routes use rather
 * than kept by hand. Each feature registers its routes (method, Express path, summary, request
 * and response schemas, security) in `server/routes/<feature>.openapi.ts` beside its router;
 * `apiRouter` gathers them into one ApiDescription per app and GET /api/openapi.json serves its
 * document. A test checks that every route of the Express router is described completely.
 */
import { z, type ZodType } from 'zod';
import { apiErrorSchema } from '../../shared/schemas/common';

export type HttpMethod = 'get' | 'post' | 'put' | 'patch' | 'delete';

/** session: the sign-in cookie; bearer: an API token with one of the scopes. */
export type Security = { session?: boolean; bearerScopes?: readonly string[] } | 'none';

export interface ResponseDoc {
  description: string;
  schema?: ZodType;
  /** Defaults to application/json when a schema is given. */
  contentType?: string;
}

export interface RouteDoc {
  method: HttpMethod;
  /** The path as mounted, with Express parameters: '/api/federations/:federation/summary'. */
  path: string;
  summary: string;
  description?: string;
  tags?: string[];
  security: Security;
  /** Descriptions of the path's parameters (each is a string). */
  params?: Record<string, string>;
  query?: z.ZodObject;
  body?: { schema: ZodType; contentType?: string; description?: string };
  /** A write that reads no body (say so, rather than leave `body` out by accident). */
  noBody?: true;
  responses: Record<number, ResponseDoc>;
}

export function routeKey(method: string, path: string): string {
  return `${method.toLowerCase()} ${path}`;
}

/**
 * What a description lacks for a client to use the route without reading its code: a 2xx
 * answer, a schema for every answer with a body, and for a write either a body schema or an
 * explicit `noBody`. Empty when the description is complete.
 */
export function missingSchemas(doc: RouteDoc): string[] {
  const missing: string[] = [];
  const ok = Object.entries(doc.responses).filter(([status]) => Number(status) >= 200 && Number(status) < 300);
  if (ok.length === 0) missing.push('a 2xx response');
  for (const [status, response] of ok) if (status !== '204' && !response.schema) missing.push(`a schema for the ${status} response`);
  if (['post', 'put', 'patch'].includes(doc.method) && !doc.body && !doc.noBody) missing.push('a request body schema (or noBody: true)');
  return missing;
}

/**
 * The descriptions of one app's routes. Built by `apiRouter` from each feature's list
 * (`server/routes/<feature>.openapi.ts`), so two apps in one process never share one.
 */
export class ApiDescription {
  readonly #routes = new Map<string, RouteDoc>();

  constructor(docs: Iterable<RouteDoc> = []) {
    for (const doc of docs) this.add(doc);
  }

  /** Adds the description of one route; describing a route twice is a mistake and throws. */
  add(doc: RouteDoc): this {
    const key = routeKey(doc.method, doc.path);
    if (this.#routes.has(key)) throw new Error(`The route ${key} is described twice`);
    this.#routes.set(key, doc);
    return this;
  }

  get(method: string, path: string): RouteDoc | undefined {
    return this.#routes.get(routeKey(method, path));
  }

  routes(): RouteDoc[] {
    return [...this.#routes.values()];
  }

  /** The OpenAPI 3.1 document of every route described here. */
  document(info: OpenApiInfo): Record<string, unknown> {
    return buildOpenApiDocument(this.routes(), info);
  }
}

/** '/api/federations/:federation/summary' → '/api/federations/{federation}/summary'. */
export function openApiPath(path: string): string {
  return path.replace(/:([A-Za-z0-9_]+)/g, '{$1}');
}

function jsonSchema(schema: ZodType, io: 'input' | 'output'): Record<string, unknown> {
  const out = z.toJSONSchema(schema, { target: 'draft-2020-12', io, unrepresentable: 'any' }) as Record<string, unknown>;
  delete out.$schema;
  return out;
}

const ERROR_RESPONSES: Record<number, string> = {
  401: 'Not signed in, or the API token is not valid',
  403: 'The caller may not use this route',
};

export interface OpenApiInfo {
  title: string;
  version: string;
}

/** The OpenAPI 3.1 document of every registered route. */
export function buildOpenApiDocument(routes: RouteDoc[], info: OpenApiInfo): Record<string, unknown> {
  const paths: Record<string, Record<string, unknown>> = {};
  const sorted = [...routes].sort((a, b) => a.path.localeCompare(b.path) || a.method.localeCompare(b.method));
  for (const route of sorted) {
    const params = [...route.path.matchAll(/:([A-Za-z0-9_]+)/g)].map((m) => m[1]);
    const parameters: Record<string, unknown>[] = params.map((name) => ({
      name,
      in: 'path',
      required: true,
      schema: { type: 'string' },
      description: route.params?.[name] ?? (name === 'federation' ? "The federation's slug" : undefined),
    }));
    if (route.query) {
      const shape = route.query.shape as Record<string, ZodType>;
      for (const [name, schema] of Object.entries(shape)) {
        parameters.push({ name, in: 'query', required: !schema.safeParse(undefined).success, schema: jsonSchema(schema, 'input') });
      }
    }
    const responses: Record<string, unknown> = {};
    for (const [status, response] of Object.entries(route.responses)) {
      responses[status] = response.schema
        ? {
            description: response.description,
            content: { [response.contentType ?? 'application/json']: { schema: jsonSchema(response.schema, 'output') } },
          }
        : { description: response.description };
    }
    if (route.security !== 'none') {
      for (const [status, description] of Object.entries(ERROR_RESPONSES)) {
        responses[status] ??= { description, content: { 'application/json': { schema: jsonSchema(apiErrorSchema, 'output') } } };
      }
    }
    const security: Record<string, string[]>[] = [];
    if (route.security !== 'none') {
      if (route.security.session) security.push({ session: [] });
      if (route.security.bearerScopes?.length) security.push({ bearer: [...route.security.bearerScopes] });
    }
    const operation: Record<string, unknown> = {
      summary: route.summary,
      operationId: `${route.method}${openApiPath(route.path)
        .replace(/[{}]/g, '')
        .replace(/[^A-Za-z0-9]+(.)?/g, (_m, c: string | undefined) => (c ? c.toUpperCase() : ''))}`,
      tags: route.tags,
      parameters: parameters.length ? parameters : undefined,
      requestBody: route.body
        ? {
            required: true,
            description: route.body.description,
            content: { [route.body.contentType ?? 'application/json']: { schema: jsonSchema(route.body.schema, 'input') } },
          }
        : undefined,
      responses,
      security,
    };
    if (route.description) operation.description = route.description;
    (paths[openApiPath(route.path)] ??= {})[route.method] = JSON.parse(JSON.stringify(operation)) as unknown;
  }
  return {
    openapi: '3.1.0',
    info: {
      title: info.title,
      version: info.version,
      description:
        'The Panelwise API. Federation-scoped routes check the caller’s federation and role on the server. ' +
        'JSON bodies are limited to 16 kB for anonymous callers, 256 kB for signed-in users and API tokens and 10 MB on the batch API (413), ' +
        'and to 20 levels of nesting (400). A full disk answers 507 with nothing written; a busy database 503.',
    },
    jsonSchemaDialect: 'https://json-schema.org/draft/2020-12/schema',
    servers: [{ url: '/' }],
    components: {
      securitySchemes: {
        session: { type: 'apiKey', in: 'cookie', name: 'pw_session', description: 'The session cookie set by POST /api/session' },
        bearer: { type: 'http', scheme: 'bearer', description: "An API token of the federation (scope 'read' or 'import')" },
      },
    },
    paths,
  };
}

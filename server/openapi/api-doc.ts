import { extendZodWithOpenApi, OpenAPIRegistry, OpenApiGeneratorV31, type ResponseConfig } from '@asteasolutions/zod-to-openapi';
import { z } from 'zod';

// `.openapi('Name')` on zod schemas: names a component (a $ref in the document)
extendZodWithOpenApi(z);

/**
 * The OpenAPI document of one app: every route registers itself here next to its definition, with the
 * same zod schemas its handler parses. One per createApp (never a module-level list).
 */
export type ApiDoc = OpenAPIRegistry;

export function newApiDoc(): ApiDoc {
  const doc = new OpenAPIRegistry();
  doc.registerComponent('securitySchemes', 'bearer', { type: 'http', scheme: 'bearer', bearerFormat: 'JWT' });
  return doc;
}

/** Paging fields of a list asked for with `offset` (server/services/list-page.ts). */
export const pageCounts = { total: z.number().int(), limit: z.number().int(), offset: z.number().int() };

/** A list route's answer: the whole list, or with `offset` one page `{ items, total, limit, offset }`. */
export const listOrPage = <T extends z.ZodType>(item: T) => z.union([z.array(item), z.object({ items: z.array(item), ...pageCounts })]);

/** Every error answer: `{ error, field? }` (server/routes/errors.ts). */
export const ApiError = z.object({ error: z.string(), field: z.string().optional().openapi({ description: 'the request field at fault' }) }).openapi('Error');

type ErrorStatus = 400 | 401 | 403 | 404 | 409 | 413 | 415 | 422 | 429;
const ERROR_TEXT: Record<ErrorStatus, string> = {
  400: 'invalid input; `field` names the field',
  401: 'missing or invalid token',
  403: 'role not allowed',
  404: 'not found (an object of a site the caller may not see reads as not found)',
  409: 'conflict with the current state',
  413: 'too large',
  415: 'unsupported content',
  422: 'the Idempotency-Key was used for another request',
  429: 'too many attempts',
};

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';
type ZodObj = z.ZodObject<z.ZodRawShape>;

export interface ApiRoute {
  method: Method;
  /** The Express path under /api, as given to the router (`/engines/:id`). */
  path: string;
  /** Unique, camelCase (listWorkOrders). */
  id: string;
  tag: string;
  summary: string;
  description?: string;
  /** `public`: no token; `signed-in`: any role; or the roles allowed (adds 403). */
  access: 'public' | 'signed-in' | readonly string[];
  params?: ZodObj;
  query?: ZodObj;
  headers?: ZodObj;
  /** The JSON body schema the handler parses. */
  body?: z.ZodType;
  /** The handler reads a missing body as `{}` (or the schema takes undefined). */
  bodyOptional?: boolean;
  /** A multipart/form-data body (uploads). */
  form?: ZodObj;
  /** The success body. */
  ok: z.ZodType;
  /** 200 unless told. */
  status?: 200 | 201 | 204;
  /** A success body that is not JSON (a file): its media types. */
  media?: string[];
  /** Error answers beyond the automatic ones (400 with input, 401 unless public, 403 with roles, 404 with a path parameter). */
  errors?: ErrorStatus[];
  /** Other answers with their own body (a 409 carrying the reasons, a second success status). */
  also?: Record<number, { description: string; schema: z.ZodType }>;
}

/**
 * Compile-time check that a response schema is honest: every value of the handler's type T is a valid body
 * (T is assignable to the schema's type). `covers<CoolantTestView>()(CoolantTest)`.
 */
export const covers =
  <T>() =>
  <S extends z.ZodType>(schema: S & ([T] extends [z.output<S>] ? unknown : { notCovered: T })): S =>
    schema;

/** `:id` -> `{id}`, under /api. */
export const openApiPath = (expressPath: string) => `/api${expressPath.replace(/:(\w+)/g, '{$1}')}`;

const json = (schema: z.ZodType, description: string): ResponseConfig => ({ description, content: { 'application/json': { schema } } });

/** Register one route: short to write next to `r.get(...)`. */
export function route(doc: ApiDoc, r: ApiRoute): void {
  const hasPathParam = /:\w+/.test(r.path);
  if (hasPathParam && !r.params) throw new Error(`${r.method} ${r.path}: give the params schema`);
  const input = !!(r.params || r.query || r.headers || r.body || r.form);
  const statuses = new Set<ErrorStatus>(r.errors ?? []);
  if (input) statuses.add(400);
  if (r.access !== 'public') statuses.add(401);
  if (Array.isArray(r.access)) statuses.add(403);
  if (hasPathParam) statuses.add(404);
  const status = r.status ?? 200;
  const responses: Record<number, ResponseConfig> = {
    [status]: r.media
      ? { description: 'OK', content: Object.fromEntries(r.media.map((m) => [m, { schema: r.ok }])) }
      : status === 204
        ? { description: 'done, no body' }
        : json(r.ok, status === 201 ? 'created' : 'OK'),
  };
  for (const s of [...statuses].sort()) responses[s] = json(ApiError, ERROR_TEXT[s]);
  for (const [s, a] of Object.entries(r.also ?? {})) responses[Number(s)] = json(a.schema, a.description);
  const roles = Array.isArray(r.access) ? ` Roles: ${r.access.join(', ')}.` : '';
  doc.registerPath({
    method: r.method,
    path: openApiPath(r.path),
    operationId: r.id,
    tags: [r.tag],
    summary: r.summary,
    ...(r.description || roles ? { description: `${r.description ?? ''}${roles}`.trim() } : {}),
    ...(r.access === 'public' ? { security: [] } : {}),
    request: {
      ...(r.params ? { params: r.params } : {}),
      ...(r.query ? { query: r.query } : {}),
      ...(r.headers ? { headers: r.headers } : {}),
      ...(r.body ? { body: { required: !r.bodyOptional, content: { 'application/json': { schema: r.body } } } } : {}),
      ...(r.form ? { body: { required: true, content: { 'multipart/form-data': { schema: r.form } } } } : {}),
    },
    responses,
  });
}

// eslint-disable-next-line @typescript-eslint/no-require-imports
const VERSION: string = require('../../package.json').version;

/** The OpenAPI 3.1 document of everything registered in `doc`. */
export function buildApiDocument(doc: ApiDoc) {
  const tags = [...new Set(doc.definitions.flatMap((d) => (d.type === 'route' ? (d.route.tags ?? []) : [])))];
  return new OpenApiGeneratorV31(doc.definitions).generateDocument({
    openapi: '3.1.0',
    info: {
      title: 'Jacketwatch API',
      version: VERSION,
      description:
        'Cooling-system watch for stationary engines. SI units throughout; errors are `{ error, field? }`. A user limited to some sites (PUT /api/users/{id}/sites) sees only those sites; an object of another site answers 404.',
    },
    servers: [{ url: '/' }],
    security: [{ bearer: [] }],
    tags: tags.map((name) => ({ name })),
  });
}

/**
 * The OpenAPI document is generated from the zod schemas each route parses (server/openapi/api-doc.ts):
 * every Express route is in it and every operation is a route; every operation has a unique operationId
 * and a typed success body; the document keeps the structural rules of OpenAPI 3.1 and every schema in it
 * is valid JSON Schema 2020-12 (the dialect of OpenAPI 3.1), checked with Ajv; real answers of the running
 * app match their documented schema.
 *
 * No validator of whole OpenAPI documents is installed (nor the schema JSON of the specification), so the
 * document-level rules checked here are the ones of the specification's "OpenAPI Object", "Paths Object",
 * "Operation Object" and "Parameter Object" sections, written out below.
 */
import Ajv2020 from 'ajv/dist/2020';
import type { Express } from 'express';
import request from 'supertest';
import { makeAlarmApp, type AlarmApp } from './support/alarm-app';

type Json = Record<string, unknown>;
interface Operation {
  operationId?: string;
  tags?: string[];
  parameters?: { name: string; in: string; required?: boolean; schema?: Json }[];
  requestBody?: { content: Record<string, { schema: Json }> };
  responses: Record<string, { description?: string; content?: Record<string, { schema?: Json }> }>;
  security?: Record<string, string[]>[];
}
interface Doc {
  openapi: string;
  info: { title: string; version: string };
  servers: { url: string }[];
  security: Record<string, string[]>[];
  tags: { name: string }[];
  paths: Record<string, Record<string, Operation>>;
  components: { schemas: Record<string, Json>; securitySchemes: Record<string, Json> };
}

const METHODS = ['get', 'put', 'post', 'delete', 'options', 'head', 'patch', 'trace'];

/** Every route of an Express app as "METHOD /path", walking mounted routers; `:id` -> `{id}`. */
function expressRoutes(app: Express): string[] {
  const out: string[] = [];
  type Layer = { rawPath?: string; route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: Layer[] } };
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const [m, on] of Object.entries(layer.route.methods))
          if (on) out.push(`${m.toUpperCase()} ${prefix}${layer.route.path}`.replace(/:(\w+)/g, '{$1}'));
      } else if (layer.handle?.stack) {
        const at = typeof layer.rawPath === 'string' && layer.rawPath !== '/' ? layer.rawPath : '';
        walk(layer.handle.stack, prefix + at);
      }
    }
  };
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, '');
  return [...new Set(out)].sort();
}

const operations = (doc: Doc) =>
  Object.entries(doc.paths).flatMap(([p, item]) =>
    Object.entries(item)
      .filter(([m]) => METHODS.includes(m))
      .map(([m, op]) => ({ key: `${m.toUpperCase()} ${p}`, path: p, method: m, op })),
  );

/** Every $ref in a JSON value. */
function refsIn(v: unknown, out: string[] = []): string[] {
  if (Array.isArray(v)) for (const x of v) refsIn(x, out);
  else if (v && typeof v === 'object')
    for (const [k, x] of Object.entries(v)) {
      if (k === '$ref' && typeof x === 'string') out.push(x);
      else refsIn(x, out);
    }
  return out;
}

let a: AlarmApp;
let doc: Doc;

/**
 * Compiles a schema of the document with its `$ref`s resolved against the document's components. One Ajv holds
 * the components (added once, under DOC_ID) and each schema's `#/components/...` refs point there, so every
 * component is compiled once instead of again for every schema that refers to it (the same check, about ten
 * times faster than a new Ajv per schema); a ref to a component that is not there still fails to compile.
 */
const DOC_ID = 'urn:jacketwatch:openapi';
let withComponents: Ajv2020 | null = null;
function compileWithComponents(schema: Json) {
  if (!withComponents) {
    withComponents = new Ajv2020({ strict: false, validateFormats: false });
    withComponents.addSchema({ $id: DOC_ID, components: doc.components });
  }
  return withComponents.compile(JSON.parse(JSON.stringify(schema).replaceAll('"$ref":"#/components/', `"$ref":"${DOC_ID}#/components/`)));
}
beforeAll(async () => {
  a = await makeAlarmApp();
  doc = (await request(a.app).get('/api/openapi.json').expect(200)).body;
});
afterAll(() => a.close());

describe('the OpenAPI document', () => {
  it('has every Express route, and every operation is an Express route', () => {
    const routes = expressRoutes(a.app);
    const documented = operations(doc)
      .map((o) => o.key)
      .sort();
    expect(routes.length).toBeGreaterThan(80);
    expect({ missingFromDocument: routes.filter((r) => !documented.includes(r)) }).toEqual({ missingFromDocument: [] });
    expect({ notARoute: documented.filter((d) => !routes.includes(d)) }).toEqual({ notARoute: [] });
  });

  it('gives every operation a unique camelCase operationId, a tag, and a typed success body', () => {
    const ids = operations(doc).map((o) => o.op.operationId);
    for (const [i, id] of ids.entries())
      expect({ op: operations(doc)[i].key, id }).toEqual({ op: operations(doc)[i].key, id: expect.stringMatching(/^[a-z][a-zA-Z0-9]+$/) });
    expect(new Set(ids).size).toBe(ids.length);
    const declaredTags = doc.tags.map((t) => t.name);
    for (const { key, op } of operations(doc)) {
      expect({ key, tags: op.tags?.length === 1 && declaredTags.includes(op.tags[0]) }).toEqual({ key, tags: true });
      const ok = Object.entries(op.responses).filter(([s]) => /^2\d\d$/.test(s));
      expect({ key, successes: ok.length > 0 }).toEqual({ key, successes: true });
      for (const [status, res] of ok) {
        if (status === '204') {
          expect(res.content).toBeUndefined();
          continue;
        }
        const media = Object.values(res.content ?? {});
        expect({ key, status, media: media.length > 0 }).toEqual({ key, status, media: true });
        for (const m of media) {
          const s = m.schema ?? {};
          // a $ref, or a schema that says what it is: never `{}` nor a bare `{ type: object }`
          const typed =
            '$ref' in s ||
            'anyOf' in s ||
            'allOf' in s ||
            (typeof s.type === 'string' && (s.type !== 'object' || 'properties' in s || 'additionalProperties' in s)) ||
            Array.isArray(s.type);
          expect({ key, status, typed }).toEqual({ key, status, typed: true });
        }
      }
      for (const [status, res] of Object.entries(op.responses).filter(([s]) => /^4\d\d$/.test(s))) {
        expect({ key, status, schema: res.content?.['application/json']?.schema }).toEqual({ key, status, schema: expect.anything() });
      }
    }
  });

  it('request schemas are the ones the routes parse (spot checks: strict bodies, lengths, nullability, coerced query numbers)', () => {
    const body = (p: string, m: string) => doc.paths[p][m].requestBody!.content['application/json'].schema as Json;
    const create = body('/api/work-orders', 'post') as { additionalProperties: boolean; properties: Record<string, Json>; required: string[] };
    expect(create.additionalProperties).toBe(false);
    expect(create.required.sort()).toEqual(['engineId', 'kind']);
    expect(create.properties.title).toMatchObject({ minLength: 1, maxLength: 200 });
    expect(JSON.stringify(create.properties.assigneeId)).toContain('null');
    const points = doc.paths['/api/engines/{id}/readings'].get.parameters!.find((p) => p.name === 'points')!;
    expect(points).toMatchObject({ in: 'query', schema: { type: 'integer', minimum: 1, maximum: 2000, default: 500 } });
    expect(doc.paths['/api/auth/login'].post.security).toEqual([]);
    expect(doc.paths['/api/users'].get.responses['403']).toBeDefined();
  });

  it('keeps the structural rules of OpenAPI 3.1', () => {
    expect(doc.openapi).toMatch(/^3\.1\.\d+$/);
    expect(typeof doc.info.title).toBe('string');
    expect(typeof doc.info.version).toBe('string');
    expect(doc.servers).toEqual([{ url: '/' }]);
    expect(doc.components.securitySchemes.bearer).toEqual({ type: 'http', scheme: 'bearer', bearerFormat: 'JWT' });
    for (const req of doc.security) for (const name of Object.keys(req)) expect(doc.components.securitySchemes[name]).toBeDefined();
    for (const { key, path, op } of operations(doc)) {
      expect(path.startsWith('/')).toBe(true);
      for (const req of op.security ?? []) for (const name of Object.keys(req)) expect(doc.components.securitySchemes[name]).toBeDefined();
      // each {name} of the path template is a required path parameter, and no path parameter is not in it
      const inTemplate = [...path.matchAll(/\{(\w+)\}/g)].map((m) => m[1]).sort();
      const params = op.parameters ?? [];
      const pathParams = params.filter((p) => p.in === 'path');
      expect({ key, pathParams: pathParams.map((p) => p.name).sort() }).toEqual({ key, pathParams: inTemplate });
      for (const p of pathParams) expect({ key, name: p.name, required: p.required }).toEqual({ key, name: p.name, required: true });
      for (const p of params) expect(['query', 'header', 'path', 'cookie']).toContain(p.in);
      expect(new Set(params.map((p) => `${p.in}:${p.name}`)).size).toBe(params.length);
      for (const status of Object.keys(op.responses)) expect(status).toMatch(/^([1-5]\d\d|[1-5]XX|default)$/);
      for (const res of Object.values(op.responses)) expect(typeof res.description).toBe('string');
      if (op.requestBody) expect(Object.keys(op.requestBody.content).length).toBeGreaterThan(0);
    }
    // every $ref points at a component that exists
    for (const ref of refsIn(doc)) {
      const m = /^#\/components\/schemas\/(.+)$/.exec(ref);
      expect({ ref, resolves: !!m && m[1] in doc.components.schemas }).toEqual({ ref, resolves: true });
    }
  });

  it('every schema in it is valid JSON Schema 2020-12 (the OpenAPI 3.1 dialect) and compiles with its $refs', () => {
    const ajv = new Ajv2020({ strict: false, validateFormats: false });
    const schemas: [string, Json][] = Object.entries(doc.components.schemas).map(([n, s]) => [`components/${n}`, s]);
    for (const { key, op } of operations(doc)) {
      for (const p of op.parameters ?? []) if (p.schema) schemas.push([`${key} ${p.name}`, p.schema]);
      for (const m of Object.values(op.requestBody?.content ?? {})) schemas.push([`${key} body`, m.schema]);
      for (const [s, r] of Object.entries(op.responses)) for (const m of Object.values(r.content ?? {})) if (m.schema) schemas.push([`${key} ${s}`, m.schema]);
    }
    expect(schemas.length).toBeGreaterThan(300);
    for (const [where, s] of schemas) {
      expect({ where, valid: ajv.validateSchema(s), errors: ajv.errors ?? null }).toEqual({ where, valid: true, errors: null });
      expect(() => compileWithComponents(s)).not.toThrow();
    }
  });

  it('real answers match their documented success schema', async () => {
    const check = async (docPath: string, url: string, send?: { method: 'post' | 'put' | 'patch'; body: object; status: number }) => {
      const req = send ? request(a.app)[send.method](url).send(send.body) : request(a.app).get(url);
      const res = await req.set('Authorization', `Bearer ${a.tokens.admin}`);
      const ok = doc.paths[docPath][send?.method ?? 'get'].responses[String(res.status)];
      expect({ url, status: res.status, documented: !!ok }).toEqual({ url, status: send?.status ?? 200, documented: true });
      const schema = ok.content!['application/json'].schema!;
      const validate = compileWithComponents(schema);
      expect({ url, valid: validate(res.body), errors: validate.errors ?? null }).toEqual({ url, valid: true, errors: null });
      return res.body;
    };
    const e = a.engineId;
    // some rows first, so that lists are not empty
    const order = await check('/api/work-orders', '/api/work-orders', {
      method: 'post',
      body: { engineId: e, kind: 'coolant-test', title: 'Quarterly test' },
      status: 201,
    });
    await check('/api/work-orders/{id}/transition', `/api/work-orders/${order.id}/transition`, {
      method: 'post',
      body: { to: 'cancelled', note: 'not needed' },
      status: 200,
    });
    await check('/api/engines/{id}/coolant-tests', `/api/engines/${e}/coolant-tests`, {
      method: 'post',
      body: { method: 'strip', scaUnitsPerGal: 1.0, glycolPercent: 50, ph: 9.5 },
      status: 201,
    });
    await check('/api/engines/{id}/coolant-top-ups', `/api/engines/${e}/coolant-top-ups`, {
      method: 'post',
      body: { volumeL: 2, liquid: 'premix', premixPercent: 50 },
      status: 201,
    });
    await check('/api/engines/{id}/run-hours', `/api/engines/${e}/run-hours`, {
      method: 'post',
      body: { runHours: 120, reason: 'hour meter read' },
      status: 200,
    });
    const hour = 3_600_000;
    const start = Date.now() + hour;
    const shift = { siteId: a.siteId, userId: a.users.technician.id, startsAt: start, endsAt: start + 8 * hour };
    await check('/api/oncall', '/api/oncall', { method: 'post', body: shift, status: 201 });
    await check('/api/calc/boiling-point', '/api/calc/boiling-point', {
      method: 'post',
      body: { gaugePressureKpa: 100, glycol: 'ethylene', percent: 50 },
      status: 200,
    });
    await check('/api/calc/make-up-water', '/api/calc/make-up-water', { method: 'post', body: { chlorideMgL: 20, hardnessMgLCaCO3: 100 }, status: 200 });
    await check('/api/work-orders/{id}', `/api/work-orders/${order.id}`);
    await check('/api/engines/{id}/coolant-tests', `/api/engines/${e}/coolant-tests`);
    await check('/api/engines/{id}/run-hours', `/api/engines/${e}/run-hours`);
    await check('/api/health', '/api/health');
    await check('/api/auth/me', '/api/auth/me');
    await check('/api/sites', '/api/sites');
    await check('/api/engines', '/api/engines');
    await check('/api/engines/{id}', `/api/engines/${e}`);
    await check('/api/engines/{id}/readings', `/api/engines/${e}/readings?channel=coolant_temp`);
    await check('/api/engines/{id}/opening-check', `/api/engines/${e}/opening-check`);
    await check('/api/engines/{id}/history', `/api/engines/${e}/history`);
    await check('/api/engines/{id}/service-plan', `/api/engines/${e}/service-plan`);
    await check('/api/engines/{id}/coolant-top-ups', `/api/engines/${e}/coolant-top-ups`);
    await check('/api/users', '/api/users');
    await check('/api/devices', '/api/devices');
    await check('/api/admin/ingest', '/api/admin/ingest');
    await check('/api/work-order-templates', '/api/work-order-templates');
    await check('/api/work-orders', '/api/work-orders');
    await check('/api/due-list', '/api/due-list?include=all');
    await check('/api/additive-profile', '/api/additive-profile');
    await check('/api/coolant-limits', '/api/coolant-limits');
    await check('/api/alarms', '/api/alarms?state=all');
    await check('/api/alarms/summary', '/api/alarms/summary');
    await check('/api/alarms/performance', '/api/alarms/performance');
    await check('/api/rules', '/api/rules');
    await check('/api/rules/engines/{id}', `/api/rules/engines/${e}`);
    await check('/api/oncall', '/api/oncall');
    await check('/api/people', '/api/people');
    await check('/api/admin/outbox', '/api/admin/outbox');
    await check('/api/openapi.json', '/api/openapi.json');
  });
});

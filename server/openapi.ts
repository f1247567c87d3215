import { authPaths, devicePaths, enginePaths, healthPaths, sitePaths, userPaths } from './openapi/core-paths';
import { coreSchemas } from './openapi/core-schemas';
import type { Json, OpenApiGroup } from './openapi/helpers';
import { workPaths } from './openapi/work-paths';

export type { OpenApiGroup } from './openapi/helpers';

/** One entry per route group. A new feature adds its group here (or calls addOpenApiGroup at start-up). */
export const OPENAPI_GROUPS: OpenApiGroup[] = [healthPaths, authPaths, sitePaths, enginePaths, devicePaths, userPaths, workPaths];

export function addOpenApiGroup(group: OpenApiGroup): void {
  if (!OPENAPI_GROUPS.includes(group)) OPENAPI_GROUPS.push(group);
}

// eslint-disable-next-line @typescript-eslint/no-require-imports
const VERSION: string = require('../package.json').version;

export function buildOpenApi(): Json {
  const paths: Record<string, Json> = {};
  const schemas: Record<string, Json> = { ...coreSchemas };
  for (const g of OPENAPI_GROUPS) {
    for (const [p, item] of Object.entries(g.paths)) {
      const tagged: Json = {};
      for (const [method, op] of Object.entries(item)) tagged[method] = method === 'parameters' ? op : { tags: [g.tag], ...(op as Json) };
      paths[p] = { ...(paths[p] ?? {}), ...tagged };
    }
    Object.assign(schemas, g.schemas ?? {});
  }
  return {
    openapi: '3.1.0',
    info: {
      title: 'Jacketwatch API',
      version: VERSION,
      description:
        'Cooling-system watch for stationary engines. SI units throughout; errors are `{ error, field? }`. A user limited to some sites (PUT /api/users/{id}/sites) sees only those sites; an object of another site answers 404.',
    },
    servers: [{ url: '/' }],
    security: [{ bearer: [] }],
    tags: OPENAPI_GROUPS.map((g) => ({ name: g.tag })),
    paths,
    components: { schemas, securitySchemes: { bearer: { type: 'http', scheme: 'bearer', bearerFormat: 'JWT' } } },
  };
}

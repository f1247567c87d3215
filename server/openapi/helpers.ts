/** Small builders so each route group's OpenAPI entries stay short. */
export type Json = Record<string, unknown>;

export const ref = (name: string): Json => ({ $ref: `#/components/schemas/${name}` });
export const json = (schema: Json, description = 'OK'): Json => ({ description, content: { 'application/json': { schema } } });
export const body = (schema: Json): Json => ({ required: true, content: { 'application/json': { schema } } });
export const idParam: Json = { name: 'id', in: 'path', required: true, schema: { type: 'integer', minimum: 1 } };
export const err = (description: string): Json => json(ref('Error'), description);

/** Common error responses of a route: 400 only when it validates input, 403 only when role-limited. */
export function errors(opts: { auth?: boolean; admin?: boolean; input?: boolean; notFound?: boolean } = {}): Json {
  const out: Json = {};
  if (opts.input) out['400'] = err('invalid input; `field` names the field');
  if (opts.auth !== false) out['401'] = err('missing or invalid token');
  if (opts.admin) out['403'] = err('role not allowed');
  if (opts.notFound) out['404'] = err('not found');
  return out;
}

export interface OpenApiGroup {
  tag: string;
  paths: Record<string, Json>;
  schemas?: Record<string, Json>;
}

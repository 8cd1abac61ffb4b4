import { z } from 'zod';
import { METHOD_REGISTRY } from '../analysis/methods/index.js';
import { paramsSchema } from '../analysis/methods/params.js';
import type { Config } from '../config.js';
import type { RegisteredRoute, RouteSpec } from '../lib/http.js';

function jsonSchema(schema: z.ZodType | undefined) {
  if (!schema) return undefined;
  try {
    return z.toJSONSchema(schema, { io: 'input', unrepresentable: 'any' });
  } catch {
    return { type: 'object' };
  }
}

/** The OpenAPI 3.1 document, built from the route table so it cannot drift from the code. */
export function buildOpenApi(routes: RegisteredRoute[], config: Config) {
  const paths: Record<string, Record<string, unknown>> = {};
  for (const r of routes) {
    const p = r.fullPath.replace(/:(\w+)/g, '{$1}');
    const params = [...r.fullPath.matchAll(/:(\w+)/g)].map((m) => ({ name: m[1], in: 'path', required: true, schema: { type: 'string' } }));
    const access = r.access === 'public' ? 'anyone' : r.access === 'signedIn' ? 'signed in' : `roles: ${r.access.join(', ')}`;
    (paths[p] ??= {})[r.method] = {
      summary: r.summary,
      description: `Access: ${access}.`,
      tags: r.tags,
      parameters: params.length ? params : undefined,
      security: r.access === 'public' ? [] : [{ session: [] }, { bearer: [] }],
      requestBody: r.body ? { required: true, content: { 'application/json': { schema: jsonSchema(r.body) } } } : undefined,
      responses: {
        [String(r.status ?? 200)]: { description: 'Success' },
        default: { description: 'Error', content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } },
      },
    };
  }
  return {
    openapi: '3.1.0',
    // The API's version, not the software's (which only administrators see, on /health).
    info: { title: 'Tidegauge API', version: '1', description: 'Trend–cycle decompositions, vintages and publication review.' },
    servers: [{ url: `${config.publicOrigin}/api/v1` }],
    paths,
    components: {
      securitySchemes: {
        session: { type: 'apiKey', in: 'cookie', name: 'tg_session' },
        bearer: { type: 'http', scheme: 'bearer' },
      },
      schemas: {
        // The params object of each decomposition method (POST /decompose `params`), from the method registry.
        ...Object.fromEntries(METHOD_REGISTRY.map((m) => [`Params_${m.id.replace(/[^A-Za-z0-9]/g, '_')}`, { ...jsonSchema(paramsSchema(m.params)), title: `${m.name}: params` }])),
        Error: {
          type: 'object',
          required: ['error'],
          properties: {
            error: {
              type: 'object',
              required: ['code', 'message'],
              properties: { code: { type: 'string' }, message: { type: 'string' }, details: {} },
            },
          },
        },
      },
    },
  };
}

export function openapiRoutes(getRoutes: () => RegisteredRoute[], config: Config): RouteSpec[] {
  let doc: ReturnType<typeof buildOpenApi> | undefined;
  return [
    {
      method: 'get',
      path: '/openapi.json',
      access: 'public',
      summary: 'This API as an OpenAPI 3.1 document',
      tags: ['system'],
      handler: () => (doc ??= buildOpenApi(getRoutes(), config)),
    },
  ];
}

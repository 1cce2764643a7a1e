/**
 * What every operation of the OpenAPI document states besides its schemas:
 * an operationId (a client generator's method name), its security (public
 * routes say so with an empty list), and a description of every response
 * instead of the generator's "Default Response". Applied to each route as
 * the document is built, so a new route gets them without a step to forget.
 */
import { jsonSchemaTransform, jsonSchemaTransformObject } from 'fastify-type-provider-zod';

type TransformInput = Parameters<typeof jsonSchemaTransform>[0];

/** What each status code means in this API (problem responses are RFC 9457 problem+json). */
export const RESPONSE_DESCRIPTIONS: Readonly<Record<string, string>> = {
  '200': 'Success: the resource or result',
  '201': 'Created: the new resource or the result of the write',
  '204': 'Success, no content',
  '400': 'Bad input: a problem+json naming the field or row; nothing was stored',
  '401': 'No valid API key: missing, malformed, unknown or revoked',
  '403': "The key's role lacks the permission this operation needs",
  '404': "Not found in the caller's organisation",
  '409':
    'Conflicts with stored data (an overlap, a frozen baseline, a changed reading without a reason); nothing was stored',
  '413': 'The body is larger than the service accepts',
  '415': 'The body is not of a media type this operation takes',
  '422': 'Well-formed, but cannot be done with the stored data (the problem says why); nothing was stored',
  '429': 'Too many requests for this key or address; retry after the Retry-After seconds',
  '503': 'The database is not available; retry after the Retry-After seconds',
};

/** "get /v1/meters/:id/readings" → "getMetersByIdReadings": unique per method and path, stable. */
export function operationIdFor(method: string, url: string): string {
  const words = url
    .split('/')
    .filter((part) => part !== '' && part !== 'v1')
    .map((part) => (part.startsWith(':') ? `by-${part.slice(1)}` : part))
    .flatMap((part) => part.split(/[^A-Za-z0-9]+/))
    .filter((word) => word !== '');
  return method.toLowerCase() + words.map((word) => word[0]!.toUpperCase() + word.slice(1)).join('');
}

/** jsonSchemaTransform, then the operation's id, security and response descriptions. */
export function transformWithOperationDetails(input: TransformInput): ReturnType<typeof jsonSchemaTransform> {
  const out = jsonSchemaTransform(input);
  const schema = out.schema as Record<string, unknown>;
  const method = Array.isArray(input.route.method) ? input.route.method[0]! : input.route.method;
  if (schema.operationId === undefined) schema.operationId = operationIdFor(String(method), input.url);
  // A route without a security requirement is public, and says so.
  if (schema.security === undefined) schema.security = [];
  const responses = schema.response as Record<string, Record<string, unknown>> | undefined;
  if (responses) {
    for (const [code, response] of Object.entries(responses)) {
      if (response && typeof response === 'object' && response.description === undefined)
        responses[code] = { ...response, description: RESPONSE_DESCRIPTIONS[code] ?? `HTTP ${code}` };
    }
  }
  return out;
}

type ObjectInput = Parameters<typeof jsonSchemaTransformObject>[0];

/**
 * jsonSchemaTransformObject, less the components nothing refers to (the
 * type provider registers an input variant of every named schema, most of
 * which no operation takes).
 */
export function transformObjectWithoutUnused(input: ObjectInput): ReturnType<typeof jsonSchemaTransformObject> {
  const out = jsonSchemaTransformObject(input) as { components?: { schemas?: Record<string, unknown> } };
  const schemas = out.components?.schemas;
  if (!schemas) return out as ReturnType<typeof jsonSchemaTransformObject>;
  for (let changed = true; changed;) {
    changed = false;
    const text = JSON.stringify({ ...out, components: { ...out.components, schemas: {} } });
    const inSchemas = Object.entries(schemas).map(([name, schema]) => ({ name, text: JSON.stringify(schema) }));
    for (const name of Object.keys(schemas)) {
      const ref = `"#/components/schemas/${name}"`;
      const used = text.includes(ref) || inSchemas.some((s) => s.name !== name && s.text.includes(ref));
      if (!used) {
        delete schemas[name];
        changed = true;
      }
    }
  }
  return out as ReturnType<typeof jsonSchemaTransformObject>;
}

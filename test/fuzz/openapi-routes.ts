/**
 * The routes to fuzz, read from the app's own OpenAPI document, so a new
 * route is fuzzed as soon as it is registered.
 */

/** The subset of JSON Schema the generators understand. */
export interface JsonSchema {
  type?: string | string[];
  enum?: unknown[];
  properties?: Record<string, JsonSchema>;
  required?: string[];
  additionalProperties?: boolean | JsonSchema;
  items?: JsonSchema;
  anyOf?: JsonSchema[];
  oneOf?: JsonSchema[];
  allOf?: JsonSchema[];
  minItems?: number;
  maxItems?: number;
  minLength?: number;
  maxLength?: number;
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  exclusiveMaximum?: number;
  pattern?: string;
  format?: string;
  description?: string;
  $ref?: string;
}

export type Method = 'GET' | 'POST' | 'PUT' | 'DELETE';

export interface FuzzRoute {
  method: Method;
  /** The OpenAPI path, e.g. /v1/meters/{id}/readings. */
  path: string;
  pathParams: string[];
  query: Record<string, JsonSchema>;
  /** The application/json request body schema, if the route takes a body. */
  body: JsonSchema | null;
  /** The body is also taken as text/csv (said in the body schema's description). */
  takesCsv: boolean;
  /** The route needs a key (it declares bearer security). */
  secured: boolean;
}

interface OpenApiDocument {
  paths?: Record<string, Record<string, OpenApiOperation>>;
  components?: { schemas?: Record<string, JsonSchema> };
}

interface OpenApiOperation {
  parameters?: { in: string; name: string; schema?: JsonSchema }[];
  requestBody?: { content?: Record<string, { schema?: JsonSchema }> };
  security?: unknown[];
}

const METHODS: readonly Method[] = ['GET', 'POST', 'PUT', 'DELETE'];

/** Inline every #/components/schemas reference (the documents have no cycles in request schemas). */
export function resolveRefs(schema: JsonSchema, components: Record<string, JsonSchema>, depth = 0): JsonSchema {
  if (depth > 20) return {};
  if (schema.$ref) {
    const name = schema.$ref.replace(/^#\/components\/schemas\//, '');
    return resolveRefs(components[name] ?? {}, components, depth + 1);
  }
  const out: JsonSchema = { ...schema };
  if (schema.properties) {
    out.properties = Object.fromEntries(
      Object.entries(schema.properties).map(([k, v]) => [k, resolveRefs(v, components, depth + 1)]),
    );
  }
  if (schema.items) out.items = resolveRefs(schema.items, components, depth + 1);
  for (const key of ['anyOf', 'oneOf', 'allOf'] as const) {
    const list = schema[key];
    if (list) out[key] = list.map((s) => resolveRefs(s, components, depth + 1));
  }
  return out;
}

export function routesFromOpenApi(document: unknown): FuzzRoute[] {
  const doc = document as OpenApiDocument;
  const components = doc.components?.schemas ?? {};
  const routes: FuzzRoute[] = [];
  for (const [path, operations] of Object.entries(doc.paths ?? {})) {
    for (const [verb, operation] of Object.entries(operations)) {
      const method = verb.toUpperCase() as Method;
      if (!METHODS.includes(method)) continue;
      const parameters = operation.parameters ?? [];
      const json = operation.requestBody?.content?.['application/json']?.schema;
      const body = json ? resolveRefs(json, components) : null;
      routes.push({
        method,
        path,
        pathParams: parameters.filter((p) => p.in === 'path').map((p) => p.name),
        query: Object.fromEntries(
          parameters.filter((p) => p.in === 'query').map((p) => [p.name, resolveRefs(p.schema ?? {}, components)]),
        ),
        body,
        takesCsv: /text\/csv/.test(body?.description ?? ''),
        secured: (operation.security ?? []).length > 0,
      });
    }
  }
  return routes;
}

export const routeName = (route: FuzzRoute): string => `${route.method} ${route.path}`;

/**
 * The OpenAPI document as committed in openapi/openapi.json: built from the
 * app itself (zod schemas are its only source), keys sorted so the file only
 * changes when the API does.
 */
import { fileURLToPath } from 'node:url';
import { canonicalJson } from '../../lib/canonical-json.js';
import { openStore } from '../../store/connect.js';
import { buildApp } from '../app.js';

/** openapi/openapi.json at the repository root. */
export const OPENAPI_FILE = fileURLToPath(new URL('../../../openapi/openapi.json', import.meta.url));

/** Pretty-printed with sorted keys and a trailing newline. */
export function formatOpenApi(document: unknown): string {
  return `${JSON.stringify(JSON.parse(canonicalJson(document)), null, 2)}\n`;
}

/** The document of an app on a throwaway in-memory store (no migrations needed: nothing is queried). */
export async function buildOpenApiDocument(): Promise<unknown> {
  const store = openStore('sqlite::memory:');
  const app = await buildApp({ store });
  try {
    await app.ready();
    return app.swagger();
  } finally {
    await app.close();
    await store.close();
  }
}

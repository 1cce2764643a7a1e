/** `npm run openapi`: regenerate openapi/openapi.json from the routes. */
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, relative } from 'node:path';
import { pathToFileURL } from 'node:url';
import { buildOpenApiDocument, formatOpenApi, OPENAPI_FILE } from './document.js';

export async function writeOpenApi(file = OPENAPI_FILE): Promise<void> {
  const text = formatOpenApi(await buildOpenApiDocument());
  mkdirSync(dirname(file), { recursive: true });
  writeFileSync(file, text);
  process.stdout.write(`wrote ${relative(process.cwd(), file)}\n`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  writeOpenApi().catch((error: unknown) => {
    process.stderr.write(`openapi: ${error instanceof Error ? error.message : String(error)}\n`);
    process.exit(1);
  });
}

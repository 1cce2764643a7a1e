/**
 * The version `mvledger --version` prints: the package's own, read from the
 * package.json above this module (src/cli under tsx, dist/src/cli when built).
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

export function packageVersion(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 6; i++) {
    const candidate = join(dir, 'package.json');
    if (existsSync(candidate)) {
      const parsed = JSON.parse(readFileSync(candidate, 'utf8')) as { name?: string; version?: string };
      if (parsed.name === 'mvledger' && typeof parsed.version === 'string') return parsed.version;
    }
    dir = dirname(dir);
  }
  return 'unknown';
}

/**
 * The browser workbench at /app: static files served from memory, no
 * server-side session. The page is plain HTML and CSS (web/public) and ES
 * modules compiled by `npm run build` (tsconfig.web.json → dist/web); it
 * calls the same /v1 API with the key the user pastes, kept in the tab's
 * sessionStorage only.
 *
 * Files are read once when the app is built and looked up by exact name, so
 * no request path ever reaches the file system. Every answer carries a
 * strict content security policy of its own: scripts, styles and requests
 * from this origin only, nothing inline, no frames, no plugins.
 */
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { FastifyInstance, FastifyReply } from 'fastify';

/** The policy of every /app answer: nothing inline, nothing from another origin. */
export const WORKBENCH_CSP = [
  "default-src 'none'",
  "script-src 'self'",
  "style-src 'self'",
  "img-src 'self' data:",
  "connect-src 'self'",
  "font-src 'self'",
  "base-uri 'none'",
  "form-action 'none'",
  "frame-ancestors 'none'",
  "object-src 'none'",
].join('; ');

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.svg': 'image/svg+xml; charset=utf-8',
};

interface Asset {
  body: Buffer;
  type: string;
  etag: string;
}

/** The package root: the nearest folder above this module holding package.json (src/ and dist/src/ alike). */
export function packageRoot(from = dirname(fileURLToPath(import.meta.url))): string {
  let folder = from;
  while (!existsSync(join(folder, 'package.json'))) {
    const parent = dirname(folder);
    if (parent === folder) throw new Error(`no package.json above ${from}`);
    folder = parent;
  }
  return folder;
}

function typeOf(file: string): string | undefined {
  const dot = file.lastIndexOf('.');
  return dot < 0 ? undefined : TYPES[file.slice(dot)];
}

/** Every servable file under `folder`, keyed by its path relative to it with forward slashes. */
function readTree(folder: string, prefix: string, into: Map<string, Asset>): void {
  if (!existsSync(folder)) return;
  const walk = (current: string) => {
    for (const name of readdirSync(current)) {
      const path = join(current, name);
      if (statSync(path).isDirectory()) walk(path);
      else {
        const type = typeOf(name);
        if (!type) continue;
        const body = readFileSync(path);
        const etag = `"${createHash('sha256').update(body).digest('base64url').slice(0, 27)}"`;
        into.set(prefix + relative(folder, path).split(sep).join('/'), { body, type, etag });
      }
    }
  };
  walk(folder);
}

/** Where the workbench's files are: the page and styles, and the compiled modules. */
export interface WorkbenchFolders {
  public: string;
  modules: string;
}

export function defaultWorkbenchFolders(root = packageRoot()): WorkbenchFolders {
  return { public: join(root, 'web', 'public'), modules: join(root, 'dist', 'web') };
}

/** The files the workbench serves (path under /app/ → file); exported for tests and the benchmark. */
export function loadWorkbenchAssets(folders: WorkbenchFolders = defaultWorkbenchFolders()): Map<string, Asset> {
  const assets = new Map<string, Asset>();
  readTree(folders.public, '', assets);
  readTree(folders.modules, 'js/', assets);
  return assets;
}

const NOT_BUILT = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>mvledger workbench</title></head><body><h1>The workbench is not built</h1><p>Run <code>npm run build</code> and restart the service.</p></body></html>\n`;

function secure(reply: FastifyReply): FastifyReply {
  return reply
    .header('content-security-policy', WORKBENCH_CSP)
    .header('x-content-type-options', 'nosniff')
    .header('referrer-policy', 'no-referrer')
    .header('cache-control', 'no-cache');
}

export function installWorkbench(app: FastifyInstance, folders?: WorkbenchFolders): void {
  const assets = loadWorkbenchAssets(folders);
  const built = assets.has('index.html') && assets.has('js/web/src/main.js');

  app.get('/app', { schema: { hide: true } }, async (_request, reply) => reply.redirect('/app/', 302));
  app.get<{ Params: { '*': string } }>('/app/*', { schema: { hide: true }, config: { rateLimit: false } }, async (request, reply) => {
    const path = request.params['*'] === '' ? 'index.html' : request.params['*'];
    secure(reply);
    if (!built && path === 'index.html') return reply.code(503).type(TYPES['.html']!).send(NOT_BUILT);
    const asset = assets.get(path);
    if (!asset) return reply.code(404).type('text/plain; charset=utf-8').send('not found\n');
    reply.header('etag', asset.etag).type(asset.type);
    if (request.headers['if-none-match'] === asset.etag) return reply.code(304).send();
    return reply.send(asset.body);
  });
}

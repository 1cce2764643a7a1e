/**
 * The browser workbench at /app: static files served from memory, no
 * server-side session. The page is plain HTML and CSS (web/public) and one
 * ES module bundled by `npm run build` (web/build.mjs → dist/web); it calls
 * the same /v1 API with the key the user pastes, kept in the tab's
 * sessionStorage only.
 *
 * Files are read once when the app is built and looked up by exact name, so
 * no request path ever reaches the file system. Everything but the page
 * itself is served under a build id (a hash of every file), so the browser
 * keeps it for a year without asking again and a new build is never mixed
 * with an old cached file. Every answer carries a strict content security
 * policy of its own: scripts, styles and requests from this origin only,
 * nothing inline, no frames, no plugins.
 */
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import fp from 'fastify-plugin';
import type { FastifyReply } from 'fastify';
import { FASTIFY_VERSION, PLUGIN } from './names.js';

/** The policy of every /app answer: nothing inline, nothing from another origin. */
export const WORKBENCH_CSP = [
  "default-src 'none'",
  "script-src 'self'",
  "style-src 'self'",
  "img-src 'self' data:",
  "connect-src 'self'",
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

/** The page's script, as web/build.mjs writes it. */
export const ENTRY_MODULE = 'workbench.js';
/** Where index.html names the build's folder (it is replaced when the files are loaded). */
const BUILD_PLACEHOLDER = '{{build}}';

export interface WorkbenchAsset {
  body: Buffer;
  type: string;
  etag: string;
}

/** The files the workbench serves: the page, and every other file under its build id. */
export interface WorkbenchFiles {
  /** A hash of every file: the folder the page loads them from, so a new build is never mixed with an old cached one. */
  build: string;
  /** index.html with the build id filled in; null when the workbench is not built. */
  page: WorkbenchAsset | null;
  /** Path under /app/<build>/ → file. */
  assets: Map<string, WorkbenchAsset>;
}

/** Where the workbench's files are: the page and styles, and the compiled modules. */
export interface WorkbenchFolders {
  public: string;
  modules: string;
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

export function defaultWorkbenchFolders(root = packageRoot()): WorkbenchFolders {
  return { public: join(root, 'web', 'public'), modules: join(root, 'dist', 'web') };
}

function typeOf(file: string): string | undefined {
  const dot = file.lastIndexOf('.');
  return dot < 0 ? undefined : TYPES[file.slice(dot)];
}

function asset(body: Buffer, type: string): WorkbenchAsset {
  return { body, type, etag: `"${createHash('sha256').update(body).digest('base64url').slice(0, 27)}"` };
}

/** Every servable file under `folder`, keyed by its path relative to it with forward slashes. */
function readTree(folder: string, prefix: string, into: Map<string, WorkbenchAsset>): void {
  if (!existsSync(folder)) return;
  const walk = (current: string) => {
    for (const name of readdirSync(current).sort()) {
      const path = join(current, name);
      if (statSync(path).isDirectory()) walk(path);
      else {
        const type = typeOf(name);
        if (type) into.set(prefix + relative(folder, path).split(sep).join('/'), asset(readFileSync(path), type));
      }
    }
  };
  walk(folder);
}

/** Read the workbench's files and prepare the page (exported for tests and the benchmark). */
export function loadWorkbenchFiles(folders: WorkbenchFolders = defaultWorkbenchFolders()): WorkbenchFiles {
  const assets = new Map<string, WorkbenchAsset>();
  readTree(folders.public, '', assets);
  readTree(folders.modules, '', assets);
  const template = assets.get('index.html');
  assets.delete('index.html');
  const hash = createHash('sha256');
  for (const [path, file] of assets) hash.update(path).update('\0').update(file.body).update('\0');
  const build = hash.digest('base64url').slice(0, 16);
  if (!template || !assets.has(ENTRY_MODULE)) return { build, page: null, assets };
  const html = template.body.toString('utf8').split(BUILD_PLACEHOLDER).join(build);
  return { build, page: asset(Buffer.from(html, 'utf8'), TYPES['.html']!), assets };
}

const NOT_BUILT = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>mvledger workbench</title></head><body><main><h1>The workbench is not built</h1><p>Run <code>npm run build</code> and restart the service.</p></main></body></html>\n`;

function secure(reply: FastifyReply): FastifyReply {
  return reply
    .header('content-security-policy', WORKBENCH_CSP)
    .header('x-content-type-options', 'nosniff')
    .header('referrer-policy', 'no-referrer');
}

function send(reply: FastifyReply, file: WorkbenchAsset, ifNoneMatch: string | undefined): FastifyReply {
  reply.header('etag', file.etag).type(file.type);
  return ifNoneMatch === file.etag ? reply.code(304).send() : reply.send(file.body);
}

export interface WorkbenchOptions {
  /** Where the files are (default: web/public and dist/web under the package root). */
  folders?: WorkbenchFolders | undefined;
}

/** /app: the page (revalidated every time, it is small) and its files under the build id (kept a year: a new build has a new id). */
export const workbenchPlugin = fp<WorkbenchOptions>(
  async (app, options) => {
    const files = loadWorkbenchFiles(options.folders);
    app.get('/app', { schema: { hide: true } }, async (_request, reply) => secure(reply).redirect('/app/', 302));
    app.get('/app/', { schema: { hide: true }, config: { rateLimit: false } }, async (request, reply) => {
      secure(reply).header('cache-control', 'no-cache');
      if (!files.page) return reply.code(503).type(TYPES['.html']!).send(NOT_BUILT);
      return send(reply, files.page, request.headers['if-none-match']);
    });
    app.get<{ Params: { build: string; '*': string } }>(
      '/app/:build/*',
      { schema: { hide: true }, config: { rateLimit: false } },
      async (request, reply) => {
        secure(reply);
        const file = request.params.build === files.build ? files.assets.get(request.params['*']) : undefined;
        if (!file)
          return reply
            .code(404)
            .header('cache-control', 'no-store')
            .type('text/plain; charset=utf-8')
            .send('not found\n');
        reply.header('cache-control', 'public, max-age=31536000, immutable');
        return send(reply, file, request.headers['if-none-match']);
      },
    );
  },
  // After helmet, so this policy replaces its default one on every /app answer.
  { name: PLUGIN.workbench, fastify: FASTIFY_VERSION, dependencies: [PLUGIN.helmet, PLUGIN.problems] },
);

/**
 * Static checks of docker/Dockerfile, docker/compose.yaml and .dockerignore:
 * no container engine runs here, so these read the files and compare them
 * with the repository (paths that exist, package.json engines, the config
 * contract in src/config.ts). Each check value names its source: the
 * requirements of issue 5 for these files ("issue 5"), Docker's and Compose's
 * documented behaviour ("from memory"), "common practice", or a repository
 * file that the test reads ("the repository: FILE").
 */
import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parse as parseYaml } from 'yaml';
import { z } from 'zod';
import { loadConfig } from '../../src/config.js';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const DOCKER_DIR = join(ROOT, 'docker');
const read = (relative: string) => readFileSync(join(ROOT, relative), 'utf8');

// ---------- Dockerfile: a tiny instruction parser ----------

interface Instruction {
  keyword: string;
  args: string;
  line: number;
}

/** Instructions in order: comments and blank lines dropped, `\` continuations joined. */
function parseDockerfile(text: string): Instruction[] {
  const instructions: Instruction[] = [];
  let pending = '';
  let startLine = 0;
  text.split('\n').forEach((raw, index) => {
    const line = raw.trimEnd();
    // A comment inside a continued instruction is skipped too (Docker does the same).
    if (/^\s*#/.test(line) || (pending === '' && line.trim() === '')) return;
    if (pending === '') startLine = index + 1;
    const continued = line.endsWith('\\');
    pending += `${continued ? line.slice(0, -1) : line} `;
    if (continued) return;
    const [keyword = '', ...rest] = pending.trim().split(/\s+/);
    instructions.push({ keyword: keyword.toUpperCase(), args: rest.join(' '), line: startLine });
    pending = '';
  });
  if (pending !== '') throw new Error('Dockerfile ends inside a continued instruction');
  return instructions;
}

interface Stage {
  image: string;
  name: string | null;
  body: Instruction[];
}

function splitStages(instructions: Instruction[]): Stage[] {
  const stages: Stage[] = [];
  for (const instruction of instructions) {
    if (instruction.keyword === 'FROM') {
      const [image = '', as, name] = instruction.args.split(' ');
      stages.push({ image, name: as?.toUpperCase() === 'AS' && name ? name : null, body: [] });
    } else {
      const current = stages.at(-1);
      if (!current) throw new Error(`line ${instruction.line}: ${instruction.keyword} before any FROM`);
      current.body.push(instruction);
    }
  }
  return stages;
}

interface Copy {
  from: string | null;
  sources: string[];
  destination: string;
}

/** COPY in shell form (`--flag=x a b dest`) or JSON form (`["a", "dest"]`). */
function parseCopy(args: string): Copy {
  const words = args.split(' ');
  const flags = words.filter((w) => w.startsWith('--'));
  const rest = words.filter((w) => !w.startsWith('--')).join(' ');
  const paths: string[] = rest.startsWith('[') ? z.array(z.string()).parse(JSON.parse(rest)) : rest.split(' ');
  const from = flags.find((f) => f.startsWith('--from='))?.slice('--from='.length) ?? null;
  return { from, sources: paths.slice(0, -1), destination: paths.at(-1) ?? '' };
}

const dockerfile = splitStages(parseDockerfile(read('docker/Dockerfile')));
const finalStage = dockerfile.at(-1)!;
const inFinal = (keyword: string) => finalStage.body.filter((i) => i.keyword === keyword);
const copiesOf = (stage: Stage) =>
  stage.body.filter((i) => i.keyword === 'COPY' || i.keyword === 'ADD').map((i) => parseCopy(i.args));
const contextCopies = dockerfile.flatMap(copiesOf).filter((c) => c.from === null);

describe('the Dockerfile parser', () => {
  it('joins continuations, skips comments and splits stages', () => {
    const text = [
      '# top',
      'FROM base:1 AS one',
      'RUN a \\',
      '  # inside',
      '  && b',
      '',
      'FROM base:1',
      'COPY --from=one x y /dst/',
    ].join('\n');
    const stages = splitStages(parseDockerfile(text));
    // synthetic: the test sets the truth
    expect(stages.map((s) => s.name)).toEqual(['one', null]);
    expect(stages[0]?.body).toEqual([{ keyword: 'RUN', args: 'a && b', line: 3 }]);
    expect(parseCopy(stages[1]?.body[0]?.args ?? '')).toEqual({
      from: 'one',
      sources: ['x', 'y'],
      destination: '/dst/',
    });
    expect(parseCopy('["a b", "c"]')).toEqual({ from: null, sources: ['a b'], destination: 'c' });
  });
});

describe('docker/Dockerfile', () => {
  it('has a build stage and a separate runtime stage', () => {
    expect(dockerfile.length).toBeGreaterThanOrEqual(2); // issue 5: multi-stage
  });

  it('builds on the pinned slim image of the Node.js LTS the tests also run on, inside package.json engines', () => {
    const pkg = z.object({ engines: z.object({ node: z.string() }) }).parse(JSON.parse(read('package.json')));
    const ltsMajor = /LTS_VERSION = '(\d+)\./.exec(read('test/lts/run-on-lts.mjs'))?.[1];
    expect(ltsMajor).toBe('26'); // from memory: Node.js 26 is the Active LTS line from October 2026; 20 ended in April 2026
    const supportedMajors = pkg.engines.node.split('||').map((range) => range.trim().replace(/\.x$/, ''));
    expect(supportedMajors).toContain(ltsMajor); // the repository: package.json engines
    expect(supportedMajors).toContain('20'); // the repository: development runs on Node 20 (better-sqlite3 12.x)
    for (const stage of dockerfile) expect(stage.image).toBe(`node:${ltsMajor!}-bookworm-slim`); // issue 5: pinned by tag, one base for every stage
  });

  it('copies from earlier stages only', () => {
    const names = new Set<string>();
    for (const stage of dockerfile) {
      for (const copy of copiesOf(stage))
        if (copy.from !== null) expect(names, `--from=${copy.from}`).toContain(copy.from); // from memory: a stage can only read earlier ones
      if (stage.name) names.add(stage.name);
    }
  });

  it('copies only paths that exist in the repository, never .env, var/ or the whole context', () => {
    const sources = contextCopies.flatMap((c) => c.sources);
    expect(sources.length).toBeGreaterThan(0); // the repository: the build needs sources from the context
    for (const source of sources) {
      const clean = source.replace(/^\.\//, '').replace(/\/$/, '');
      expect(existsSync(join(ROOT, clean)), source).toBe(true);
      expect(clean).not.toBe('.'); // from memory: `COPY . .` would take whatever .dockerignore misses
      expect(clean).not.toMatch(/^(\.env|var)(\/|$|\.)/); // issue 5: no secrets, no local database
    }
  });

  it('gives the TypeScript build every folder and config that tsconfig.build.json compiles', () => {
    const buildConfig = z
      .object({ extends: z.string(), include: z.array(z.string()) })
      .parse(JSON.parse(read('tsconfig.build.json')));
    const compiler = dockerfile.find((s) =>
      s.body.some((i) => i.keyword === 'RUN' && i.args.includes('tsconfig.build.json')),
    );
    expect(compiler, 'a stage running tsc -p tsconfig.build.json').toBeDefined();
    const copied = copiesOf(compiler!)
      .filter((c) => c.from === null)
      .flatMap((c) => c.sources.map((s) => s.replace(/^\.\//, '').replace(/\/$/, '')));
    // the repository: what tsconfig.build.json includes and extends
    for (const needed of [
      ...buildConfig.include,
      'tsconfig.build.json',
      buildConfig.extends.replace(/^\.\//, ''),
      'package.json',
      'package-lock.json',
    ]) {
      expect(copied, needed).toContain(needed);
    }
  });

  /** The stage whose RUN calls `script`, the paths it copies from the build context, and what the final stage copies. */
  function buildOf(script: string): { copied: string[]; finalSources: string[] } {
    const builder = dockerfile.find((s) => s.body.some((i) => i.keyword === 'RUN' && i.args.includes(script)));
    expect(builder, `a stage running node ${script}`).toBeDefined();
    const tidy = (source: string) => source.replace(/^\.\//, '').replace(/\/$/, '');
    return {
      copied: copiesOf(builder!)
        .filter((c) => c.from === null)
        .flatMap((c) => c.sources.map(tidy)),
      finalSources: copiesOf(finalStage).flatMap((c) => c.sources.map(tidy)),
    };
  }

  it('builds the /app workbench and ships its page with the service', () => {
    const { copied, finalSources } = buildOf('web/build.mjs');
    // web/build.mjs bundles web/src, which imports the report charts under src/
    for (const needed of ['web', 'src']) expect(copied, needed).toContain(needed);
    // src/http/plugins/workbench.ts reads web/public and dist/web under the package root
    expect(finalSources).toContain('web/public');
    expect(finalSources).toContain('/app/dist');
  });

  it('bundles the command line that bin/mvledger.js runs and ships both', () => {
    const { copied, finalSources } = buildOf('src/cli/bundle.mjs');
    expect(copied).toContain('src'); // the bundle is built from the sources (repository layout)
    // bin/mvledger.js imports ../dist/cli/main.js (repository layout)
    expect(finalSources).toContain('bin');
    expect(finalSources).toContain('/app/dist');
  });

  it('installs dependencies reproducibly from the lockfile, production only in the final image', () => {
    const runs = dockerfile.flatMap((s) => s.body.filter((i) => i.keyword === 'RUN').map((i) => i.args));
    expect(runs.some((r) => r.includes('npm ci --omit=dev'))).toBe(true); // issue 5: runtime dependencies only
    expect(runs.some((r) => r.includes('npm rebuild better-sqlite3'))).toBe(true); // issue 5: native addon built for this base
    expect(runs.join('\n')).not.toMatch(/npm install\b/); // common practice: npm ci follows package-lock.json
    const finalSources = copiesOf(finalStage);
    expect(finalSources.some((c) => c.from !== null && c.sources.includes('/app/node_modules'))).toBe(true);
    expect(finalSources.some((c) => c.from !== null && c.sources.includes('/app/dist'))).toBe(true);
  });

  it('runs as a non-root user, set before CMD', () => {
    const users = inFinal('USER');
    const cmd = inFinal('CMD').at(-1);
    expect(users.length).toBeGreaterThan(0);
    const lastUser = users.at(-1)!;
    expect(lastUser.args).not.toMatch(/^(root|0)(:|$)/); // common practice: no root in the running container
    expect(lastUser.args).toBe('node'); // issue 5: the node image's own user
    expect(cmd).toBeDefined();
    expect(lastUser.line).toBeLessThan(cmd!.line);
  });

  it('gives the node user a writable /app/var for the SQLite default', () => {
    expect(inFinal('WORKDIR').at(-1)?.args).toBe('/app'); // issue 5
    expect(loadConfig({}).databaseUrl).toBe('sqlite:./var/mvledger.sqlite'); // the repository: src/config.ts default, relative to WORKDIR
    const runs = inFinal('RUN').map((i) => i.args);
    expect(runs.some((r) => r.includes('/app/var') && r.includes('chown node:node'))).toBe(true);
  });

  it('listens on all interfaces at 8080 in production mode', () => {
    const env = Object.fromEntries(
      inFinal('ENV').flatMap((i) => i.args.split(' ').map((pair) => pair.split('=') as [string, string])),
    );
    expect(env).toMatchObject({ HOST: '0.0.0.0', PORT: '8080', NODE_ENV: 'production' }); // issue 5
    expect(inFinal('EXPOSE').map((i) => i.args)).toEqual(['8080']); // issue 5
  });

  it('checks /readyz with node itself (slim images have no curl)', () => {
    const healthchecks = inFinal('HEALTHCHECK');
    expect(healthchecks).toHaveLength(1);
    const args = healthchecks[0]!.args;
    const json = args.slice(args.indexOf('CMD ') + 'CMD '.length);
    const command = z.array(z.string()).parse(JSON.parse(json));
    expect(command.slice(0, 2)).toEqual(['node', '-e']); // issue 5
    expect(command[2]).toContain('/readyz'); // the repository: src/http/routes/health.ts asks the database
    expect(args).not.toMatch(/\b(curl|wget)\b/);
  });

  it('starts the compiled server', () => {
    const cmd = inFinal('CMD').at(-1)!;
    expect(JSON.parse(cmd.args)).toEqual(['node', 'dist/src/server.js']); // issue 5; exec form so node gets SIGTERM
    expect(existsSync(join(ROOT, 'src/server.ts'))).toBe(true); // the repository: what tsc turns into dist/src/server.js
  });
});

// ---------- compose.yaml ----------

const environmentSchema = z.union([
  z.record(z.string(), z.union([z.string(), z.number()]).transform(String)),
  z
    .array(z.string())
    .transform((list) =>
      Object.fromEntries(list.map((entry) => [entry.split('=')[0] ?? '', entry.slice(entry.indexOf('=') + 1)])),
    ),
]);
const dependsOnSchema = z.record(z.string(), z.object({ condition: z.string() }));
const serviceSchema = z.object({
  image: z.string().optional(),
  build: z.object({ context: z.string(), dockerfile: z.string() }).optional(),
  environment: environmentSchema.default({}),
  ports: z.array(z.string()).default([]),
  volumes: z.array(z.string()).default([]),
  depends_on: dependsOnSchema.optional(),
  healthcheck: z.object({ test: z.union([z.string(), z.array(z.string())]) }).optional(),
});
const composeSchema = z.object({
  services: z.record(z.string(), serviceSchema),
  volumes: z.record(z.string(), z.unknown().nullable()).optional(),
});

const composeText = read('docker/compose.yaml');
const compose = composeSchema.parse(parseYaml(composeText));
const service = (name: string) => {
  const found = compose.services[name];
  if (!found) throw new Error(`compose.yaml has no service ${name}`);
  return found;
};
const LEDGERS = ['ledger-a', 'ledger-b']; // issue 5
const VARIABLE = /^\$\{[A-Z_][A-Z0-9_]*(:?[-?][^}]*)?\}$/; // from memory: Compose's ${VAR}, ${VAR:-default}, ${VAR:?message}
const REQUIRED_VARIABLE = /^\$\{[A-Z_][A-Z0-9_]*:?\?[^}]*\}$/;

describe('docker/compose.yaml', () => {
  it('has PostgreSQL and two ledger instances', () => {
    expect(Object.keys(compose.services).sort()).toEqual(['ledger-a', 'ledger-b', 'postgres']); // issue 5
    expect(service('postgres').image).toBe('postgres:15-bookworm'); // issue 5
  });

  it('keeps PostgreSQL data in a named volume', () => {
    const mount = service('postgres').volumes.find((v) => v.endsWith(':/var/lib/postgresql/data')); // from memory: the image's data folder
    expect(mount).toBeDefined();
    expect(Object.keys(compose.volumes ?? {})).toContain(mount!.split(':')[0]);
  });

  it('builds both ledgers from the one Dockerfile, as one image', () => {
    const builds = LEDGERS.map((name) => service(name).build);
    expect(builds[0]).toEqual({ context: '..', dockerfile: 'docker/Dockerfile' }); // issue 5: context is the repository root
    expect(builds[1]).toEqual(builds[0]);
    expect(service('ledger-b').image).toBe(service('ledger-a').image);
    // from memory: context is relative to the compose file, dockerfile to the context
    expect(resolve(DOCKER_DIR, builds[0]!.context)).toBe(ROOT);
    expect(existsSync(resolve(DOCKER_DIR, builds[0]!.context, builds[0]!.dockerfile))).toBe(true);
  });

  it('points both ledgers at the postgres service with its user and database', () => {
    const postgresEnv = service('postgres').environment;
    for (const name of LEDGERS) {
      const raw = service(name).environment.DATABASE_URL ?? '';
      const password = /^postgres:\/\/[^:]+:(\$\{[^}]+\})@/.exec(raw)?.[1];
      expect(password, name).toMatch(REQUIRED_VARIABLE); // issue 5: password from the environment only
      expect(password?.startsWith('${POSTGRES_PASSWORD')).toBe(true); // the same secret the server is given
      const url = new URL(raw.replace(password ?? '', 'placeholder'));
      expect(url.protocol).toBe('postgres:'); // the repository: src/store/database-url.ts accepts postgres://
      expect(url.hostname).toBe('postgres'); // issue 5: the service's name on compose's network
      expect(url.port).toBe('5432'); // from memory: PostgreSQL's default port
      expect(url.username).toBe(postgresEnv.POSTGRES_USER); // the repository: docker/compose.yaml's own postgres service
      expect(url.pathname).toBe(`/${postgresEnv.POSTGRES_DB}`);
    }
  });

  it('starts the ledgers only once PostgreSQL is healthy', () => {
    for (const name of LEDGERS) expect(service(name).depends_on?.postgres).toEqual({ condition: 'service_healthy' }); // issue 5
    const pgTest = service('postgres').healthcheck?.test;
    expect([pgTest].flat().join(' ')).toContain('pg_isready'); // issue 5
  });

  it('gives every service that others wait on for health a health check', () => {
    const imageHasHealthcheck = inFinal('HEALTHCHECK').length > 0;
    for (const [name, definition] of Object.entries(compose.services)) {
      for (const [target, { condition }] of Object.entries(definition.depends_on ?? {})) {
        if (condition !== 'service_healthy') continue;
        const waitedOn = service(target);
        // from memory: a built service inherits the image's HEALTHCHECK
        const hasCheck =
          waitedOn.healthcheck !== undefined ||
          (waitedOn.build?.dockerfile === 'docker/Dockerfile' && imageHasHealthcheck);
        expect(hasCheck, `${name} waits on ${target}`).toBe(true);
      }
    }
  });

  it('runs two identical ledgers: both offer the bootstrap key, neither waits for the other', () => {
    // The bootstrap is one transaction under one lock (src/services/organisations.ts,
    // raced in test/services/organisations.test.ts), so the instances may start together.
    for (const name of LEDGERS)
      expect(service(name).environment.MVLEDGER_BOOTSTRAP_KEY, name).toMatch(REQUIRED_VARIABLE);
    expect(service('ledger-b').depends_on?.['ledger-a']).toBeUndefined();
    expect(service('ledger-a').depends_on?.['ledger-b']).toBeUndefined();
  });

  it('commits no secret: passwords and keys are required ${VAR} references', () => {
    for (const [name, definition] of Object.entries(compose.services)) {
      for (const [variable, value] of Object.entries(definition.environment)) {
        if (/PASSWORD|SECRET|TOKEN|KEY/.test(variable)) expect(value, `${name}.${variable}`).toMatch(REQUIRED_VARIABLE);
        if (/^postgres(ql)?:\/\//.test(value))
          expect(/:\/\/[^:/@]+:([^@]*)@/.exec(value)?.[1] ?? '', `${name}.${variable}`).toMatch(VARIABLE);
      }
    }
    expect(composeText).not.toMatch(/mvl_[A-Za-z0-9]{8}_[A-Za-z0-9]{32,}/); // the repository: the key shape in src/config.ts
  });

  it('publishes the image port on distinct host ports', () => {
    const published = LEDGERS.map((name) => service(name).ports);
    for (const ports of published) expect(ports.map((p) => p.split(':').at(-1))).toEqual(['8080']); // the Dockerfile's EXPOSE
    const hostPorts = published.flat().map((p) => p.split(':').at(-2));
    expect(hostPorts).toEqual(['8081', '8082']); // issue 5
    expect(new Set(hostPorts).size).toBe(hostPorts.length); // issue 5: distinct host ports
  });
});

describe('.dockerignore', () => {
  it('keeps dependencies, builds, local databases and secrets out of the context', () => {
    const entries = read('.dockerignore')
      .split('\n')
      .map((line) => line.trim())
      .filter((line) => line !== '' && !line.startsWith('#'));
    for (const needed of ['node_modules', 'dist', 'var', '.git', '.env']) expect(entries, needed).toContain(needed); // issue 5, plus .env: common practice
  });
});

describe('docker/README.md', () => {
  it('documents a node one-liner that prints a bootstrap key the service accepts', () => {
    const script = /node -e "([^"]+)"/.exec(read('docker/README.md'))?.[1];
    expect(script).toBeDefined();
    const key = execFileSync(process.execPath, ['-e', script!], { encoding: 'utf8' }).trim();
    expect(key).toMatch(/^mvl_[0-9a-f]{8}_[0-9a-f]{40}$/); // issue 5: mvl_<8>_<40>
    expect(loadConfig({ MVLEDGER_BOOTSTRAP_KEY: key }).bootstrapKey).toBe(key); // the repository: src/config.ts validation
  });
});

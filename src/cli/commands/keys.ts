/**
 * `mvledger keys create|list|revoke`: the operator's way to make the first
 * key of an organisation and to get back in when its admin keys are lost.
 * Works directly on the database named by DATABASE_URL (migrated first);
 * changes are audited with the actor "system". The token is printed once,
 * alone on stdout, so `TOKEN=$(mvledger keys create ...)` captures it.
 */
import type { Store } from '../../store/connect.js';
import { findOrganisation } from '../../store/organisations.js';
import { ROLES } from '../../store/api-keys.js';
import type { Role } from '../../domain/principal.js';
import { createKey, createOrganisation } from '../../services/organisations.js';
import { listKeysForOperator, revokeKeyAsOperator } from '../../services/api-keys.js';
import { DomainError, isDomainError } from '../../domain/errors.js';
import { renderTable } from '../format/table.js';
import { UsageError } from '../errors.js';
import { parseOptions, withDatabase } from '../shared.js';

export const DEFAULT_DATABASE_URL = 'sqlite:./var/mvledger.sqlite';
const MAX_NAME_LENGTH = 200;

/** What the command prints: `stdout` is the result, `note` goes to stderr (never a secret). */
export interface KeysOutput {
  stdout: string;
  note?: string;
}

type Values = Record<string, string | boolean | undefined>;

const SPECS = {
  create: {
    'org-name': { type: 'string' },
    org: { type: 'string' },
    role: { type: 'string' },
    name: { type: 'string' },
  },
  list: { org: { type: 'string' } },
  revoke: {},
} as const;

type Subcommand = keyof typeof SPECS;

function isSubcommand(word: string | undefined): word is Subcommand {
  return word !== undefined && Object.hasOwn(SPECS, word);
}

export async function runKeys(
  args: readonly string[],
  env: NodeJS.ProcessEnv = process.env,
  now: () => string = () => new Date().toISOString(),
): Promise<KeysOutput> {
  const [subcommand, ...rest] = args;
  if (!isSubcommand(subcommand)) {
    throw new UsageError(
      subcommand === undefined
        ? 'keys needs a subcommand: create, list or revoke'
        : `unknown keys subcommand ${JSON.stringify(subcommand)} (create, list, revoke)`,
    );
  }
  const { values, positionals } = parseStrict(rest, subcommand);
  // Every argument is checked before the database is opened.
  if (subcommand === 'create') {
    const input = createInput(values, positionals);
    return withStore(env, (store) => create(store, input, now()));
  }
  if (subcommand === 'list') {
    noPositionals(positionals);
    const org = optionalText(values, 'org');
    return withStore(env, (store) => list(store, org));
  }
  if (positionals.length !== 1) throw new UsageError('keys revoke needs exactly one key id');
  const id = positionals[0]!;
  return withStore(env, (store) => revoke(store, id, now()));
}

function parseStrict(args: readonly string[], subcommand: Subcommand): { values: Values; positionals: string[] } {
  return parseOptions(args, SPECS[subcommand], true);
}

function noPositionals(positionals: readonly string[]): void {
  if (positionals.length > 0) throw new UsageError(`unexpected argument ${positionals[0]}`);
}

function optionalText(values: Values, option: string): string | undefined {
  const value = values[option];
  if (value === undefined) return undefined;
  const text = String(value).trim();
  if (text === '') throw new UsageError(`--${option} must not be empty`);
  if (/[\u0000-\u001f\u007f]/.test(text)) throw new UsageError(`--${option} must not contain control characters`);
  if (text.length > MAX_NAME_LENGTH) throw new UsageError(`--${option} must be at most ${MAX_NAME_LENGTH} characters`);
  return text;
}

interface CreateInput {
  organisation: { id: string } | { newName: string };
  role: Role;
  name: string;
}

function createInput(values: Values, positionals: readonly string[]): CreateInput {
  noPositionals(positionals);
  const orgId = optionalText(values, 'org');
  const orgName = optionalText(values, 'org-name');
  if ((orgId === undefined) === (orgName === undefined)) {
    throw new UsageError('keys create needs either --org ID (an existing organisation) or --org-name NAME (a new one)');
  }
  const roleText = values.role;
  if (roleText === undefined) throw new UsageError(`--role is required: ${ROLES.join(', ')}`);
  const role = ROLES.find((r) => r === String(roleText));
  if (!role) throw new UsageError(`--role must be one of ${ROLES.join(', ')}, got ${JSON.stringify(roleText)}`);
  const name = optionalText(values, 'name');
  if (name === undefined) throw new UsageError('--name is required (what the key is for)');
  return { organisation: orgId !== undefined ? { id: orgId } : { newName: orgName! }, role, name };
}

function withStore(env: NodeJS.ProcessEnv, work: (store: Store) => Promise<KeysOutput>): Promise<KeysOutput> {
  return withDatabase(env.DATABASE_URL ?? DEFAULT_DATABASE_URL, work);
}

async function create(store: Store, input: CreateInput, at: string): Promise<KeysOutput> {
  let organisation: { id: string; name: string };
  if ('id' in input.organisation) {
    const found = await findOrganisation(store.db, input.organisation.id);
    if (!found) throw new UsageError(`--org: no organisation ${input.organisation.id} in ${store.location}`);
    organisation = found;
  } else {
    organisation = await createOrganisation(store.db, input.organisation.newName, at);
  }
  const { token, key } = await createKey(store.db, {
    organisationId: organisation.id,
    name: input.name,
    role: input.role,
    at,
  });
  return {
    stdout: `${token}\n`,
    note: `created ${key.role} key ${key.id} (${JSON.stringify(key.name)}) in organisation ${organisation.id} (${JSON.stringify(organisation.name)}); the token above is shown only this once\n`,
  };
}

async function list(store: Store, organisationId: string | undefined): Promise<KeysOutput> {
  if (organisationId !== undefined) {
    const found = await findOrganisation(store.db, organisationId);
    if (!found) throw new UsageError(`--org: no organisation ${organisationId} in ${store.location}`);
  }
  const keys = await listKeysForOperator(store.db, organisationId);
  const lines = renderTable(
    [
      { title: 'id', align: 'left' },
      { title: 'org', align: 'left' },
      { title: 'name', align: 'left' },
      { title: 'role', align: 'left' },
      { title: 'created', align: 'left' },
      { title: 'revoked', align: 'left' },
    ],
    keys.map((k) => [k.id, k.organisationId, k.name, k.role, k.createdAt, k.revokedAt ?? '-']),
  );
  return { stdout: `${lines.join('\n')}\n` };
}

async function revoke(store: Store, id: string, at: string): Promise<KeysOutput> {
  const result = await revokeKeyAsOperator(store.db, id, at).catch((error: unknown) => {
    // Say which database was searched: the operator may have more than one.
    throw isDomainError(error) && error.kind === 'not-found'
      ? new DomainError('not-found', `${error.detail} in ${store.location}`)
      : error;
  });
  const { key } = result;
  return {
    stdout:
      result.outcome === 'revoked'
        ? `revoked key ${key.id} (${key.role}, ${JSON.stringify(key.name)}) of organisation ${key.organisationId}\n`
        : `key ${key.id} was already revoked at ${key.revokedAt}\n`,
  };
}

import { z } from 'zod';
import { name } from './common.js';

export const role = z
  .enum(['admin', 'engineer', 'analyst', 'integration'])
  .describe(
    'admin: everything, keys included; engineer: read, savings, data, ledger; analyst: read, savings; integration: savings, data',
  );

export const createApiKeyBody = z.object({ name, role }).strict();

/** A key as it is shown: never its secret or the secret's hash. */
export const apiKeySchema = z
  .object({ id: z.string(), name: z.string(), role, createdAt: z.string(), revokedAt: z.string().nullable() })
  .meta({ id: 'ApiKey' });

export const createdApiKeySchema = z
  .object({
    key: apiKeySchema,
    token: z
      .string()
      .describe(
        'The whole key, mvl_<id>_<secret>. Shown only in this response: it is not stored and cannot be shown again.',
      ),
  })
  .meta({ id: 'CreatedApiKey' });

/** The calling key as GET /v1/me shows it: never its secret. */
export const callerSchema = z
  .object({
    key: z.object({ id: z.string(), name: z.string(), role }),
    permissions: z
      .array(z.enum(['read', 'savings', 'data', 'ledger', 'keys', 'approve', 'reconcile', 'self']))
      .describe('What the role may do (every route states the one it needs); the API checks it again on every call'),
    organisation: z.object({ id: z.string(), name: z.string() }),
  })
  .meta({
    id: 'Caller',
    description: 'The calling API key (never its secret), its role’s permissions and its organisation',
  });

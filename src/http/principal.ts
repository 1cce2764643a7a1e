/** Who is calling: resolved from the API key by the auth plugin. */
import type {} from 'fastify';
import type { Role } from '../store/schema.js';

export interface Principal {
  keyId: string;
  organisationId: string;
  role: Role;
}

/**
 * What a route needs. read: GET ledger data and audit; savings: GET savings;
 * data: post readings and weather observations; ledger: create and change
 * facilities, meters, stations and baselines; keys: manage API keys; self:
 * see the calling key's own role and permissions (every role has it).
 */
export type Permission = 'read' | 'savings' | 'data' | 'ledger' | 'keys' | 'self';

export const ROLE_PERMISSIONS: Readonly<Record<Role, readonly Permission[]>> = {
  admin: ['read', 'savings', 'data', 'ledger', 'keys', 'self'],
  engineer: ['read', 'savings', 'data', 'ledger', 'self'],
  analyst: ['read', 'savings', 'self'],
  integration: ['savings', 'data', 'self'],
};

export function allows(role: Role, permission: Permission): boolean {
  return ROLE_PERMISSIONS[role].includes(permission);
}

declare module 'fastify' {
  interface FastifyRequest {
    principal?: Principal;
  }
  interface FastifyContextConfig {
    /** The permission a route requires; routes without one are public. */
    permission?: Permission;
  }
}

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
 * facilities, meters, stations and baselines; keys: manage API keys;
 * reconcile: what a billing system needs to reconcile what it posted (the
 * meter list, a meter, a meter's readings), which every role has.
 */
export type Permission = 'read' | 'savings' | 'data' | 'ledger' | 'keys' | 'reconcile';

export const ROLE_PERMISSIONS: Readonly<Record<Role, readonly Permission[]>> = {
  admin: ['read', 'savings', 'data', 'ledger', 'keys', 'reconcile'],
  engineer: ['read', 'savings', 'data', 'ledger', 'reconcile'],
  analyst: ['read', 'savings', 'reconcile'],
  // A billing system posts readings, reads back meters and its readings to reconcile, and reads savings: nothing more.
  integration: ['savings', 'data', 'reconcile'],
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

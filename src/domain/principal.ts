/** Who is calling, and what each role may do: resolved from the API key, checked by the caller's transport. */

export const ROLES = ['admin', 'engineer', 'analyst', 'integration'] as const;
export type Role = (typeof ROLES)[number];

export interface Principal {
  keyId: string;
  organisationId: string;
  role: Role;
}

/**
 * What an action needs. read: ledger data and audit; savings: savings and
 * reports; data: post readings and weather observations; ledger: create and
 * change facilities, meters, stations and baselines; keys: manage API keys.
 */
export type Permission = 'read' | 'savings' | 'data' | 'ledger' | 'keys';

export const ROLE_PERMISSIONS: Readonly<Record<Role, readonly Permission[]>> = {
  admin: ['read', 'savings', 'data', 'ledger', 'keys'],
  engineer: ['read', 'savings', 'data', 'ledger'],
  analyst: ['read', 'savings'],
  integration: ['savings', 'data'],
};

export function allows(role: Role, permission: Permission): boolean {
  return ROLE_PERMISSIONS[role].includes(permission);
}

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
 * change facilities, meters, stations and baselines, and prepare statements;
 * keys: manage API keys; approve: approve, reject or void an issued statement
 * (never one's own: the service checks that); reconcile: what a billing
 * system needs to reconcile what it posted (the meter list, a meter, a
 * meter's readings), which every role has; self: see the calling key's own
 * name, role and permissions (GET /v1/me), which every role has, so a client
 * can show only what the key may do.
 */
export type Permission = 'read' | 'savings' | 'data' | 'ledger' | 'keys' | 'approve' | 'reconcile' | 'self';

export const ROLE_PERMISSIONS: Readonly<Record<Role, readonly Permission[]>> = {
  admin: ['read', 'savings', 'data', 'ledger', 'keys', 'approve', 'reconcile', 'self'],
  engineer: ['read', 'savings', 'data', 'ledger', 'reconcile', 'self'],
  analyst: ['read', 'savings', 'approve', 'reconcile', 'self'],
  // A billing system posts readings, reads back meters and its readings to reconcile, and reads savings: nothing more.
  integration: ['savings', 'data', 'reconcile', 'self'],
};

export function allows(role: Role, permission: Permission): boolean {
  return ROLE_PERMISSIONS[role].includes(permission);
}

import { z } from 'zod';

/** The five roles of product.md §2. */
export const ROLES = ['viewer', 'operator', 'engineer', 'quality', 'admin'] as const;
export const RoleSchema = z.enum(ROLES);
export type Role = z.infer<typeof RoleSchema>;

export const ROLE_LABELS: Record<Role, string> = {
  viewer: 'Viewer (read-only)',
  operator: 'Operator',
  engineer: 'Process engineer',
  quality: 'Quality',
  admin: 'Administrator',
};

const everyone = [...ROLES];
const floor = ['operator', 'engineer'] as const;

/**
 * The one permission table: action → roles allowed. Every page and endpoint asks through
 * `can()` (browser) or `requireRole()` (server). Admin administers the system; it is not a
 * super-user of the process records.
 */
export const PERMISSIONS = {
  view: everyone,
  'calc.use': everyone,
  'spc.evaluate': everyone,
  'audit.view': ['viewer', 'quality', 'engineer', 'admin'],
  'alarm.ack': floor,
  'alarm.shelve': ['engineer'],
  'alarm.configure': ['engineer'],
  'bath.log': floor,
  'bath.configure': ['engineer'],
  'load.manage': floor,
  'dip.record': floor,
  'load.recompute': ['engineer', 'quality'],
  'survey.record': ['engineer', 'quality'],
  'window.edit': ['engineer'],
  'window.approve': ['engineer'],
  'limits.study': ['engineer'],
  'limits.approve': ['engineer'],
  'characteristic.edit': ['engineer'],
  'plant.configure': ['engineer'],
  'plant.view': ['engineer', 'admin'],
  'ingest.review': ['engineer'],
  'alarm.health': ['engineer', 'viewer', 'admin'],
  'quality.record': ['quality'],
  'hold.place': ['quality'],
  'hold.release': ['quality'],
  'nc.write': ['quality'],
  'quality.settings': ['quality'],
  'admin.users': ['admin'],
  'admin.tokens': ['admin'],
  'admin.devices': ['admin'],
  'admin.settings': ['admin'],
  'admin.mail': ['admin'],
  'admin.security': ['admin'],
  'msa.record': ['engineer', 'quality'],
} as const satisfies Record<string, readonly Role[]>;

export type Action = keyof typeof PERMISSIONS;

/** Whether `role` may perform `action`. */
export function can(role: Role | null | undefined, action: Action): boolean {
  return !!role && (PERMISSIONS[action] as readonly Role[]).includes(role);
}

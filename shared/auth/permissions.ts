/**
 * The one role → permissions map. The server enforces it (every API route
 * names the permission it needs); the client reads the same map only to show
 * or hide actions.
 */
export const ROLES = ['technician', 'supervisor', 'planner', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const PERMISSIONS = [
  'sites:read',
  'sites:write',
  'cables:read',
  'cables:write',
  'calibrations:submit',
  'calibrations:review',
  /** Accept a calibration one filed oneself, giving a reason (the four-eyes rule's exception). */
  'calibrations:override',
  'traces:read',
  'traces:upload',
  'traces:reference',
  /** Archive anyone's junk or unreadable trace with a reason (an uploader may archive their own with traces:upload). */
  'traces:archive',
  /** See archived traces and put one back in the lists. */
  'traces:restore',
  'findings:read',
  'findings:confirm',
  /** Decide an event on someone else's trace, and reverse a decision with a reason. */
  'findings:review',
  /** Record bridge, capacitance and resistance readings on a finding or cable run, and correct or withdraw one's own. */
  'measurements:record',
  'tickets:read',
  'tickets:manage',
  'tickets:work',
  'dashboard:read',
  'users:manage',
  'outbox:read',
  /** Read the captured e-mail Rholog sent to oneself (a supervisor's finding and ticket mail about their sites). */
  'outbox:own',
] as const;
export type Permission = (typeof PERMISSIONS)[number];

const FIELD: Permission[] = [
  'sites:read',
  'cables:read',
  'calibrations:submit',
  'traces:read',
  'traces:upload',
  'findings:read',
  'findings:confirm',
  'measurements:record',
  'tickets:read',
  'tickets:work',
];

export const ROLE_PERMISSIONS: Record<Role, readonly Permission[]> = {
  technician: FIELD,
  supervisor: [...FIELD, 'sites:write', 'traces:reference', 'traces:archive', 'findings:review', 'tickets:manage', 'dashboard:read', 'outbox:own'],
  planner: [
    'sites:read',
    'sites:write',
    'cables:read',
    'cables:write',
    'calibrations:submit',
    'calibrations:review',
    'traces:read',
    'findings:read',
    'tickets:read',
    'dashboard:read',
  ],
  admin: PERMISSIONS,
};

export function can(role: Role | null | undefined, permission: Permission): boolean {
  if (!role) return false;
  return ROLE_PERMISSIONS[role].includes(permission);
}

export const ROLE_LABELS: Record<Role, string> = {
  technician: 'Field technician',
  supervisor: 'Supervisor',
  planner: 'Planner',
  admin: 'Administrator',
};

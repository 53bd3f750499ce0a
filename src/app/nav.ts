import type { Permission } from '../../shared/auth/permissions';
import { paths } from './paths';

export interface NavItem {
  label: string;
  to: string;
  /** Shown only to roles with this permission (undefined: every signed-in user). */
  permission?: Permission;
  /** Short label for the phone bar. */
  short?: string;
}

/** The navigation, in the order people use it; each feature adds its entries here. */
export const NAV: NavItem[] = [
  { label: 'Today', short: 'Today', to: paths.home.to() },
  { label: 'Upload trace', short: 'Upload', to: paths.upload.to(), permission: 'traces:upload' },
  { label: 'On this phone', short: 'Phone', to: paths.device.to(), permission: 'traces:upload' },
  { label: 'Traces', to: paths.traces.to(), permission: 'traces:read' },
  { label: 'Findings', to: paths.findings.to(), permission: 'findings:read' },
  { label: 'Tickets', to: paths.tickets.to(), permission: 'tickets:read' },
  { label: 'Dashboard', to: paths.dashboard.to(), permission: 'dashboard:read' },
  { label: 'Sites', to: paths.sites.to(), permission: 'sites:read' },
  { label: 'Cable library', short: 'Cables', to: paths.cables.to(), permission: 'cables:read' },
  { label: 'Calibrations', to: paths.calibrations.to(), permission: 'calibrations:review' },
  { label: 'Users', to: paths.adminUsers.to(), permission: 'users:manage' },
  // Administrators read every message there; a supervisor reads the mail sent to them.
  { label: 'Outbox', to: paths.outbox.to(), permission: 'outbox:own' },
];

import type { ReactNode } from 'react';
import type { Permission } from '../../../shared/auth/permissions';
import { useSession } from '../../features/auth/use-session';
import { NotAllowedPage } from '../routes/not-allowed';

/** Hides a page from roles without the permission. The server still checks every call. */
export function RequirePermission({ permission, children }: { permission: Permission; children: ReactNode }) {
  const { can } = useSession();
  return can(permission) ? <>{children}</> : <NotAllowedPage />;
}

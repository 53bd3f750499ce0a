import { useState } from 'react';
import { can as canRole, type Permission } from '../../../shared/auth/permissions';
import type { PublicUser } from '../../../shared/schemas/users';
import { useMe } from './api/get-me';
import type { LengthUnit } from '../../lib/format';

export interface SessionView {
  user: PublicUser;
  can: (p: Permission) => boolean;
  unit: LengthUnit;
}

/**
 * The signed-in user; only call under the signed-in layout, which guarantees one.
 * When the session ends (signed out elsewhere, deactivated) a page can render once
 * more before the layout sends the browser to sign-in; it then sees the user it
 * was opened with, with no permission at all, instead of failing the whole page.
 */
export function useSession(): SessionView {
  const { data } = useMe();
  const [openedWith] = useState(data);
  if (data) return { user: data, can: (p) => canRole(data.role, p), unit: data.unitPreference };
  if (openedWith) return { user: openedWith, can: () => false, unit: openedWith.unitPreference };
  throw new Error('useSession() used outside the signed-in layout');
}

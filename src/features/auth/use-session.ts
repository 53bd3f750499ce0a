import { can as canRole, type Permission } from '../../../shared/auth/permissions';
import type { PublicUser } from '../../../shared/schemas/users';
import { useMe } from './api/get-me';
import type { LengthUnit } from '../../lib/format';

export interface SessionView {
  user: PublicUser;
  can: (p: Permission) => boolean;
  unit: LengthUnit;
}

/** The signed-in user; only call under the signed-in layout, which guarantees one. */
export function useSession(): SessionView {
  const { data } = useMe();
  if (!data) throw new Error('useSession() used outside the signed-in layout');
  return { user: data, can: (p) => canRole(data.role, p), unit: data.unitPreference };
}

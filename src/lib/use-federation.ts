import { useParams } from 'react-router';
import type { MembershipView } from '../../shared/schemas/session';
import { useSession } from './session';

/** The membership of the federation in the URL (/f/:federation/…), or null when the user has none. */
export function useFederation(): MembershipView | null {
  const { federation } = useParams();
  const session = useSession();
  return session.data?.memberships.find((m) => m.federation.slug === federation) ?? null;
}

/** Like useFederation, for pages that only render inside a federation the user belongs to. */
export function useCurrentFederation(): MembershipView {
  const membership = useFederation();
  if (!membership) throw new Error('useCurrentFederation used outside a federation layout');
  return membership;
}

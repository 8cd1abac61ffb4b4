import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { allows, type Access } from '@schemas/access';
import { ROLE_LABELS, ROLES } from '@schemas/people';
import { useMe } from '@/features/auth/api';
import { useDocumentTitle } from '@/lib/useDocumentTitle';

/** Shows its children to those the access rule lets in (server/schemas/access.ts); anyone else who follows a link gets a clear page. */
export function RequireRole({ access, children }: { access: Access; children: ReactNode }) {
  const me = useMe();
  if (!me.data) return null;
  if (allows(access, me.data.roles)) return <>{children}</>;
  return <RoleNeeded access={access} />;
}

export function RoleNeeded({ access }: { access: Access }) {
  const roles = typeof access === 'string' ? ROLES : access;
  const names = roles.map((r) => ROLE_LABELS[r].toLowerCase());
  const list = names.length === 1 ? names[0] : `${names.slice(0, -1).join(', ')} or ${names[names.length - 1]}`;
  useDocumentTitle(`You need the ${list} role`);
  return (
    <section className="max-w-xl" data-testid="role-needed">
      <p className="text-sm font-semibold uppercase tracking-wide text-ink-faint">Not available to you</p>
      <h1 className="page-title mt-1">You need the {list} role</h1>
      <p className="mt-3 text-ink-soft">This page is for people with the {list} role. If your work needs it, ask an administrator to add the role on the People page.</p>
      <Link to="/" className="btn mt-6">
        Go to the start page
      </Link>
    </section>
  );
}

import { Link } from 'react-router';
import { ROLE_LABELS, type Role } from '#shared/roles.ts';
import { useMe } from '../auth/queries.ts';
import { navFor } from '../../app/nav.ts';

const INTRO: Record<Role, { title: string; text: string }> = {
  surveyor: { title: 'Field queue', text: 'Spans you are surveying, returned spans first with the reviewer’s reason.' },
  safety: { title: 'Review desk', text: 'Submitted spans waiting for a safety decision, oldest first.' },
  planner: { title: 'Planning', text: 'Approved spans that harvest enough power for your harvester and time of day.' },
  admin: { title: 'Admin', text: 'Crew accounts, invitations, harvester and drone profiles, scoring settings.' },
};

/** A role's landing page header; the role's feature pages render below it. */
export function RoleHome({ role, children }: { role: Role; children?: React.ReactNode }) {
  const me = useMe();
  const intro = INTRO[role];
  return (
    <section aria-labelledby="home-title" className="space-y-4">
      <header>
        <p className="text-sm font-semibold uppercase tracking-wide text-brass-700">{ROLE_LABELS[role]}</p>
        <h1 id="home-title" className="page-title">{intro.title}</h1>
        <p className="text-ink-700">{intro.text}</p>
      </header>
      {children ?? (
        <div className="card">
          <p className="mb-3">Signed in as {me.name}. Your places:</p>
          <ul className="flex flex-wrap gap-2">
            {navFor(me.roles).map((i) => (
              <li key={i.to}><Link className="btn-ghost" to={i.to}>{i.label}</Link></li>
            ))}
          </ul>
        </div>
      )}
    </section>
  );
}

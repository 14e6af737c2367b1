import { Link } from 'react-router';
import { InviteForm } from './components/invite-form.tsx';
import { PendingInvitations } from './components/pending-invitations.tsx';
import { UsersTable } from './components/users-table.tsx';
import { CrewsPanel } from './components/crews-panel.tsx';

/** The admin's home: people, invitations and crews (rendered below the role header). */
export function AdminHome() {
  return (
    <div className="space-y-4">
      <nav aria-label="Admin" className="flex flex-wrap gap-2">
        <Link className="btn-ghost" to="/admin/outbox">Outbox</Link>
        <Link className="btn-ghost" to="/admin/audit">Audit log</Link>
      </nav>
      <UsersTable />
      <div className="grid gap-4 lg:grid-cols-2">
        <InviteForm />
        <div className="space-y-4">
          <PendingInvitations />
          <CrewsPanel />
        </div>
      </div>
    </div>
  );
}

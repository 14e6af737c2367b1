import { createBrowserRouter } from 'react-router';
import { AppLayout } from './layout.tsx';
import { homeRedirect, requireSession, RoleGate, RouteErrorBoundary, signInLoader } from './route-guards.tsx';
import { SignInPage } from '../features/auth/sign-in-page.tsx';
import { AccountPage } from '../features/account/account-page.tsx';
import { RoleHome } from '../features/home/role-home.tsx';
import { PlanningHome } from '../features/planning/planning-home.tsx';
import { StatusPage } from '../components/status-page.tsx';
import { MySpansQueue } from '../features/field/components/my-spans-queue.tsx';
import { SpanFormPage } from '../features/field/span-form-page.tsx';
import { SpansTablePage } from '../features/spans/components/spans-table-page.tsx';
import { SpanDetailPage } from '../features/spans/components/span-detail-page.tsx';
import { spanDetailPhotosSlot, spanFormPhotoSlot } from '../features/photos/slots.tsx';
import { ImportPage } from '../features/import/components/import-page.tsx';
import { CalculatorsPage } from '../features/calculators/calculators-page.tsx';
import { ProfilesPage } from '../features/profiles/profiles-page.tsx';
import { ScoringSettingsPage } from '../features/profiles/scoring-page.tsx';
import { AdminHome } from '../features/admin/admin-home.tsx';
import { OutboxPage } from '../features/admin/outbox-page.tsx';
import { AuditLogPage } from '../features/admin/audit-log-page.tsx';
import { AcceptInvitationPage } from '../features/auth/accept-invitation-page.tsx';
import { ResetPasswordPage } from '../features/auth/reset-password-page.tsx';
import { ForgotPasswordPage } from '../features/auth/forgot-password-page.tsx';
import { ReviewDesk } from '../features/review/review-desk.tsx';
import { EvidenceLinesPage } from '../features/evidence/components/evidence-lines-page.tsx';
import { LineEvidencePage } from '../features/evidence/components/line-evidence-page.tsx';
import { FlightRecordPage } from '../features/evidence/components/flight-record-page.tsx';
import { spanEvidenceSlot } from '../features/evidence/slots.tsx';
import { MissionsListPage } from '../features/missions/missions-list-page.tsx';
import { LinePage, LinesPage } from '../features/lines/line-page.tsx';

function Loading() {
  return <p className="p-8 text-center text-ink-700">Loading…</p>;
}

export const router = createBrowserRouter([
  {
    HydrateFallback: Loading,
    ErrorBoundary: RouteErrorBoundary,
    children: [
      { path: '/sign-in', loader: signInLoader, Component: SignInPage },
      { path: '/accept-invitation', Component: AcceptInvitationPage },
      { path: '/reset-password', Component: ResetPasswordPage },
      { path: '/forgot-password', Component: ForgotPasswordPage },
      {
        path: '/',
        loader: requireSession,
        Component: AppLayout,
        ErrorBoundary: RouteErrorBoundary,
        children: [
          { index: true, loader: homeRedirect },
          { path: 'field', element: <RoleGate roles={['surveyor']}><RoleHome role="surveyor"><MySpansQueue /></RoleHome></RoleGate> },
          { path: 'field/spans/new', element: <RoleGate roles={['surveyor']}><SpanFormPage photoSlot={spanFormPhotoSlot} /></RoleGate> },
          { path: 'field/spans/:id/edit', element: <RoleGate roles={['surveyor']}><SpanFormPage photoSlot={spanFormPhotoSlot} /></RoleGate> },
          { path: 'spans', Component: SpansTablePage },
          { path: 'map', lazy: () => import('../features/map/map-page.tsx') },
          { path: 'spans/:id', element: <SpanDetailPage photosSlot={spanDetailPhotosSlot} evidenceSlot={spanEvidenceSlot} /> },
          { path: 'import', element: <RoleGate roles={['surveyor', 'admin']}><ImportPage /></RoleGate> },
          { path: 'review', element: <RoleGate roles={['safety']}><RoleHome role="safety"><ReviewDesk evidenceSlot={spanEvidenceSlot} /></RoleHome></RoleGate> },
          { path: 'planning', element: <RoleGate roles={['planner']}><RoleHome role="planner"><PlanningHome /></RoleHome></RoleGate> },
          { path: 'lines', Component: LinesPage },
          { path: 'lines/:id', Component: LinePage },
          { path: 'missions', Component: MissionsListPage },
          // The plan screen carries the map library: its own lazy chunk.
          { path: 'missions/new', lazy: async () => { const m = await import('../features/missions/plan-page.tsx'); return { element: <RoleGate roles={['planner']}><m.PlanPage /></RoleGate> }; } },
          { path: 'missions/:id', lazy: () => import('../features/missions/plan-page.tsx') },
          { path: 'missions/:id/brief', lazy: () => import('../features/missions/mission-brief-page.tsx') },
          { path: 'admin', element: <RoleGate roles={['admin']}><RoleHome role="admin"><AdminHome /></RoleHome></RoleGate> },
          { path: 'admin/outbox', element: <RoleGate roles={['admin']}><OutboxPage /></RoleGate> },
          { path: 'admin/profiles', element: <RoleGate roles={['admin']}><ProfilesPage /></RoleGate> },
          { path: 'admin/scoring', element: <RoleGate roles={['admin']}><ScoringSettingsPage /></RoleGate> },
          { path: 'calculators', Component: CalculatorsPage },
          { path: 'evidence', Component: EvidenceLinesPage },
          { path: 'evidence/lines/:id', Component: LineEvidencePage },
          { path: 'evidence/flights/:id', Component: FlightRecordPage },
          { path: 'admin/audit', element: <RoleGate roles={['admin', 'safety']}><AuditLogPage /></RoleGate> },
          { path: 'account', Component: AccountPage },
          { path: '*', element: <StatusPage code={404} title="Nothing here" message="That page does not exist." /> },
        ],
      },
    ],
  },
]);

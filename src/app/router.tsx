import { createBrowserRouter } from 'react-router';
import { AppLayout } from './layout.tsx';
import { handleEndedSessions } from './session.ts';
import { homeRedirect, requireSession, RoleGate, RouteErrorBoundary, signInLoader } from './route-guards.tsx';
import { lazy, Suspense, type ReactNode } from 'react';
import { SignInPage } from '../features/auth/sign-in-page.tsx';
import { RoleHome } from '../features/home/role-home.tsx';
import { StatusPage } from '../components/status-page.tsx';
import { NeedsNetwork } from '../components/needs-network.tsx';

/**
 * Route-level code splitting: each page (with what only it uses) is its own chunk, loaded when the route is first
 * opened, so the first screen downloads the shell and the sign-in page only.
 */
function page<M>(load: () => Promise<M>, render: (m: M) => ReactNode) {
  return async () => ({ element: render(await load()) });
}
/**
 * The span form is one lazy component shared by its two routes: saving a new span moves to its edit address, and the
 * form (with its "Draft saved." notice) must stay the same mounted component across that move.
 */
const SpanForm = lazy(async () => {
  const [f, p] = await Promise.all([import('../features/field/span-form-page.tsx'), import('../features/photos/slots.tsx')]);
  return { default: () => <f.SpanFormPage photoSlot={p.spanFormPhotoSlot} /> };
});
const evidenceSlot = () => import('../features/evidence/slots.tsx');
import { FieldOutboxPage } from '../features/outbox/field-outbox-page.tsx';
import { useMe } from '../features/auth/queries.ts';

function FieldOutbox() {
  return <FieldOutboxPage userId={useMe().id} />;
}

function Loading() {
  return <p className="p-8 text-center text-ink-700">Loading…</p>;
}

/** The screens that need the network (README Decisions, "Offline field work"), each with what only the server can do. */
const NETWORK = {
  review: { what: 'The review desk', why: 'Decisions are checked against the span as the server holds it now, so they are made online.' },
  import: { what: 'Import', why: 'The server reads and checks the file, and nothing is saved until it has.' },
  plan: { what: 'Mission planning', why: 'Routes are planned by the server over every approved span and zone.' },
  admin: { what: 'Administration', why: 'Accounts and invitations are changed on the server only.' },
  mail: { what: 'Sent mail', why: 'The mail log is kept on the server.' },
  profiles: { what: 'The profiles page', why: 'Drone and harvester profiles rescore spans on the server.' },
  scoring: { what: 'The scoring settings page', why: 'A change rescores spans on the server.' },
  calculators: { what: 'The calculator page', why: 'The figures are worked out by the server.' },
  audit: { what: 'The audit log', why: 'The log is read from the server as it stands.' },
} as const;

export const router = createBrowserRouter([
  {
    HydrateFallback: Loading,
    ErrorBoundary: RouteErrorBoundary,
    children: [
      { path: '/sign-in', loader: signInLoader, Component: SignInPage },
      { path: '/accept-invitation', lazy: page(() => import('../features/auth/accept-invitation-page.tsx'), (m) => <m.AcceptInvitationPage />) },
      { path: '/reset-password', lazy: page(() => import('../features/auth/reset-password-page.tsx'), (m) => <m.ResetPasswordPage />) },
      { path: '/forgot-password', lazy: page(() => import('../features/auth/forgot-password-page.tsx'), (m) => <m.ForgotPasswordPage />) },
      {
        path: '/',
        loader: requireSession,
        Component: AppLayout,
        ErrorBoundary: RouteErrorBoundary,
        children: [
          { index: true, loader: homeRedirect },
          { path: 'field', lazy: page(() => import('../features/field/components/my-spans-queue.tsx'), (m) => <RoleGate roles={['surveyor']}><RoleHome role="surveyor"><m.MySpansQueue /></RoleHome></RoleGate>) },
          { path: 'field/outbox', Component: FieldOutbox },
          { path: 'field/spans/new', element: <RoleGate roles={['surveyor']}><Suspense fallback={<Loading />}><SpanForm /></Suspense></RoleGate> },
          { path: 'field/spans/:id/edit', element: <RoleGate roles={['surveyor']}><Suspense fallback={<Loading />}><SpanForm /></Suspense></RoleGate> },
          { path: 'spans', lazy: page(() => import('../features/spans/components/spans-table-page.tsx'), (m) => <m.SpansTablePage />) },
          { path: 'map', lazy: page(() => Promise.all([import('../features/map/map-page.tsx'), import('./offline-area-slot.tsx')]), ([m, o]) => <m.MapPage areaSlot={(ctx) => <o.MapOfflineAreas {...ctx} />} />) },
          { path: 'spans/:id', lazy: page(() => Promise.all([import('../features/spans/components/span-detail-page.tsx'), import('../features/photos/slots.tsx'), evidenceSlot()]), ([d, p, e]) => <d.SpanDetailPage photosSlot={p.spanDetailPhotosSlot} evidenceSlot={e.spanEvidenceSlot} />) },
          { path: 'import', lazy: page(() => import('../features/import/components/import-page.tsx'), (m) => <RoleGate roles={['surveyor', 'admin']}><NeedsNetwork {...NETWORK.import}><m.ImportPage /></NeedsNetwork></RoleGate>) },
          { path: 'review', lazy: page(() => Promise.all([import('../features/review/review-desk.tsx'), evidenceSlot()]), ([r, e]) => <RoleGate roles={['safety']}><RoleHome role="safety"><NeedsNetwork {...NETWORK.review}><r.ReviewDesk evidenceSlot={e.spanEvidenceSlot} /></NeedsNetwork></RoleHome></RoleGate>) },
          { path: 'planning', lazy: page(() => import('../features/planning/planning-home.tsx'), (m) => <RoleGate roles={['planner']}><RoleHome role="planner"><m.PlanningHome /></RoleHome></RoleGate>) },
          { path: 'lines', lazy: page(() => import('../features/lines/line-page.tsx'), (m) => <m.LinesPage />) },
          { path: 'lines/:id', lazy: page(() => import('../features/lines/line-page.tsx'), (m) => <m.LinePage />) },
          { path: 'missions', lazy: page(() => import('../features/missions/missions-list-page.tsx'), (m) => <m.MissionsListPage />) },
          // The plan screen carries the map library: its own lazy chunk.
          { path: 'missions/new', lazy: async () => { const m = await import('../features/missions/plan-page.tsx'); return { element: <RoleGate roles={['planner']}><NeedsNetwork {...NETWORK.plan}><m.PlanPage /></NeedsNetwork></RoleGate> }; } },
          { path: 'missions/:id', lazy: page(() => Promise.all([import('../features/missions/plan-page.tsx'), evidenceSlot()]), ([m, e]) => <m.PlanPage flownSlot={e.missionFlownSlot} />) },
          { path: 'missions/:id/brief', lazy: () => import('../features/missions/mission-brief-page.tsx') },
          { path: 'admin', lazy: page(() => import('../features/admin/admin-home.tsx'), (m) => <RoleGate roles={['admin']}><RoleHome role="admin"><NeedsNetwork {...NETWORK.admin}><m.AdminHome /></NeedsNetwork></RoleHome></RoleGate>) },
          { path: 'admin/outbox', lazy: page(() => import('../features/admin/outbox-page.tsx'), (m) => <RoleGate roles={['admin']}><NeedsNetwork {...NETWORK.mail}><m.OutboxPage /></NeedsNetwork></RoleGate>) },
          { path: 'admin/profiles', lazy: page(() => import('../features/profiles/profiles-page.tsx'), (m) => <RoleGate roles={['admin']}><NeedsNetwork {...NETWORK.profiles}><m.ProfilesPage /></NeedsNetwork></RoleGate>) },
          { path: 'admin/scoring', lazy: page(() => import('../features/profiles/scoring-page.tsx'), (m) => <RoleGate roles={['admin']}><NeedsNetwork {...NETWORK.scoring}><m.ScoringSettingsPage /></NeedsNetwork></RoleGate>) },
          { path: 'calculators', lazy: page(() => import('../features/calculators/calculators-page.tsx'), (m) => <NeedsNetwork {...NETWORK.calculators}><m.CalculatorsPage /></NeedsNetwork>) },
          { path: 'evidence', lazy: page(() => import('../features/evidence/components/evidence-lines-page.tsx'), (m) => <m.EvidenceLinesPage />) },
          { path: 'evidence/lines/:id', lazy: page(() => import('../features/evidence/components/line-evidence-page.tsx'), (m) => <m.LineEvidencePage />) },
          { path: 'evidence/flights/:id', lazy: page(() => import('../features/evidence/components/flight-record-page.tsx'), (m) => <m.FlightRecordPage />) },
          { path: 'admin/audit', lazy: page(() => import('../features/admin/audit-log-page.tsx'), (m) => <RoleGate roles={['admin', 'safety']}><NeedsNetwork {...NETWORK.audit}><m.AuditLogPage /></NeedsNetwork></RoleGate>) },
          { path: 'account', lazy: page(() => import('../features/account/account-page.tsx'), (m) => <m.AccountPage />) },
          { path: '*', element: <StatusPage code={404} title="Nothing here" message="That page does not exist." /> },
        ],
      },
    ],
  },
]);

// Any 401 from the API while the app is open brings the sign-in page, then back to the same page.
handleEndedSessions(router);

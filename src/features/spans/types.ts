// Record shapes as the API returns them: the shared inventory types, plus the audit entry the history shows.
export type {
  Span,
  Line,
  Structure,
  Hazard,
  HazardKind,
  SpanConductor,
  SpanAssessmentSummary,
  ConductorCatalogueEntry,
  Page,
  ImportReport,
  ImportRowReport,
} from '#shared/schemas/inventory.ts';

export interface AuditEntryView {
  id: number | string;
  at: string;
  actorId: string | null;
  actorName?: string | null;
  action: string;
  recordType: string;
  recordId: string;
  before: unknown;
  after: unknown;
}

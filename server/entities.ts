// Every entity schema the ORM knows. A feature adds its schemas here and a migration in server/migrations/.
import { UserSchema, CrewSchema } from './modules/auth/user.entity.ts';
import { SessionSchema } from './modules/auth/session.entity.ts';
import { AuditEntrySchema } from './modules/audit/audit.entity.ts';
import { OutboxMessageSchema } from './modules/mail/outbox.entity.ts';
import { InvitationSchema } from './modules/auth/invitation.entity.ts';
import { PasswordResetSchema } from './modules/auth/reset.entity.ts';
import { HarvesterProfileSchema, DroneProfileSchema, BenchTestSchema, ScoringSettingsSchema } from './modules/assessment/profile.entity.ts';
import { AssessmentSchema } from './modules/assessment/assessment.entity.ts';
import { ZoneSchema } from './modules/zones/zone.entity.ts';
import { LineSchema } from './modules/inventory/line.entity.ts';
import { StructureSchema } from './modules/inventory/structure.entity.ts';
import { SpanSchema } from './modules/inventory/span.entity.ts';
import { HazardSchema } from './modules/inventory/hazard.entity.ts';
import { HazardKindSchema } from './modules/inventory/hazard-kind.entity.ts';
import { ConductorTypeSchema } from './modules/inventory/conductor-type.entity.ts';
import { PhotoSchema } from './modules/photos/photo.entity.ts';
import { LoadSeriesDaySchema, LoadSeriesSchema } from './modules/evidence/load-series.entity.ts';
import { FlightRecordSchema, PerchEventSchema } from './modules/evidence/flight-record.entity.ts';
import { PendingWorkSchema } from './modules/jobs/pending-work.entity.ts';
import { JobSchema } from './modules/jobs/job.entity.ts';
import { LinePermissionSchema } from './modules/line-permissions/line-permission.entity.ts';
import { RateLimitHitSchema } from './http/rate-limit-hits.entity.ts';
import { IdempotencyKeySchema } from './modules/idempotency/idempotency-key.entity.ts';
import { MissionSchema, MissionPerchSchema } from './modules/missions/mission.entity.ts';

export const entities = [LineSchema, StructureSchema, SpanSchema, HazardSchema, HazardKindSchema, ConductorTypeSchema, UserSchema, CrewSchema, SessionSchema, AuditEntrySchema, HarvesterProfileSchema, DroneProfileSchema, BenchTestSchema, ScoringSettingsSchema, AssessmentSchema, ZoneSchema, OutboxMessageSchema, InvitationSchema, PasswordResetSchema, PhotoSchema, LoadSeriesDaySchema, LoadSeriesSchema, FlightRecordSchema, PerchEventSchema, PendingWorkSchema, JobSchema, IdempotencyKeySchema, LinePermissionSchema, MissionSchema, MissionPerchSchema, RateLimitHitSchema];

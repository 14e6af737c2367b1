// Every entity schema the ORM knows. A feature adds its schemas here and a migration in server/migrations/.
import { UserSchema, CrewSchema } from './modules/auth/user.entity.ts';
import { SessionSchema } from './modules/auth/session.entity.ts';
import { AuditEntrySchema } from './modules/audit/audit.entity.ts';

export const entities = [UserSchema, CrewSchema, SessionSchema, AuditEntrySchema];

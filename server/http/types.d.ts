import type { EntityManager } from '@mikro-orm/sqlite';
import type { User } from '../modules/auth/user.entity.ts';

declare module 'express-serve-static-core' {
  interface Request {
    /** A fork of the EntityManager for this request alone. */
    em: EntityManager;
    /** The signed-in user, when the request carries a valid session. */
    user?: User;
    sessionId?: string;
  }
}

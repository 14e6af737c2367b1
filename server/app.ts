import fs from 'node:fs';
import path from 'node:path';
import express from 'express';
import helmet from 'helmet';
import type { MikroORM } from '@mikro-orm/sqlite';
import type { AppConfig } from './env.ts';
import type { AppContext } from './context.ts';
import { createLucia } from './modules/auth/lucia.ts';
import { errorHandler, notFoundHandler } from './http/errors.ts';
import { Lifecycle } from './lifecycle.ts';
import { originCheck, sessionMiddleware } from './http/session.ts';
import { idempotency } from './http/idempotency.ts';
import { healthRouter } from './modules/health/health.router.ts';
import { authRouter, meRouter } from './modules/auth/auth.router.ts';
import { inventoryRouter } from './modules/inventory/inventory.router.ts';
import { invitationRouter } from './modules/auth/invitation.router.ts';
import { resetRouter } from './modules/auth/reset.router.ts';
import { adminRouter } from './modules/admin/admin.router.ts';
import { auditRouter } from './modules/audit/audit.router.ts';
import { zonesRouter } from './modules/zones/zones.router.ts';
import { mapRouter } from './modules/map/map.router.ts';
import { photosRouter } from './modules/photos/photo.router.ts';
import { assessmentRouters } from './modules/assessment/index.ts';
import { evidenceRouter } from './modules/evidence/evidence.router.ts';
import { missionsRouter } from './modules/missions/missions.router.ts';
import { missionExportsRouter } from './modules/missions/export.router.ts';
import { linePermissionsRouter } from './modules/line-permissions/line-permissions.router.ts';
import { storageFromConfig, type AppStorage } from './modules/photos/storage.ts';

export interface CreateAppOptions {
  orm: MikroORM;
  config: AppConfig;
  /** Folder of the built client; served when it exists. */
  clientDir?: string;
  /** The file store; default from the configuration (storageFromConfig). */
  storage?: AppStorage;
}

export function createApp({ orm, config, clientDir = path.resolve('dist'), storage = storageFromConfig(config) }: CreateAppOptions) {
  const closers: (() => Promise<void> | void)[] = [];
  const lifecycle = new Lifecycle();
  const ctx: AppContext = { orm, config, lucia: createLucia(orm, config.secureCookies), onClose: (fn) => closers.push(fn), lifecycle, storage };
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', config.trustProxy);
  app.use(lifecycle.middleware());
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          // The map library builds its worker from a blob and injects its own styles.
          workerSrc: ["'self'", 'blob:'],
          childSrc: ["'self'", 'blob:'],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'"],
          upgradeInsecureRequests: config.secureCookies ? [] : null,
        },
      },
      strictTransportSecurity: config.secureCookies,
    }),
  );
  app.use(express.json({ limit: '1mb' }));
  app.use('/api', sessionMiddleware(ctx), originCheck(ctx));
  // Creating POSTs may carry an Idempotency-Key (retries from the offline queue).
  app.use(['/api/structures', '/api/spans', '/api/lines', '/api/photos', '/api/zones', '/api/hazard-kinds', '/api/profiles', '/api/admin', '/api/missions'], idempotency(ctx));

  app.use('/api/health', healthRouter(ctx));
  app.use('/api/auth', authRouter(ctx));
  app.use('/api/me', meRouter(ctx));
  app.use('/api', inventoryRouter(ctx));
  app.use('/api/lines', linePermissionsRouter(ctx));
  app.use('/api/auth', invitationRouter(ctx), resetRouter(ctx));
  app.use('/api/admin', adminRouter(ctx));
  app.use('/api/audit', auditRouter(ctx));

  app.use('/api/zones', zonesRouter(ctx));
  app.use('/api/photos', photosRouter(ctx));
  app.use(assessmentRouters(ctx));
  app.use(evidenceRouter(ctx));
  app.use('/api/missions', missionsRouter(ctx), missionExportsRouter(ctx));
  app.use(mapRouter(ctx));
  app.use('/api', notFoundHandler);

  if (fs.existsSync(path.join(clientDir, 'index.html'))) {
    app.use(
      express.static(clientDir, {
        index: false,
        maxAge: '1h',
        // The service worker and the manifest are checked for a new version on every visit.
        setHeaders: (res, file) => {
          if (/[\\/](sw\.js|manifest\.webmanifest)$/.test(file)) res.setHeader('Cache-Control', 'no-cache');
        },
      }),
    );
    app.get('/{*splat}', (_req, res) => {
      res.sendFile(path.join(clientDir, 'index.html'), { headers: { 'Cache-Control': 'no-cache' } });
    });
  }
  app.use(notFoundHandler);
  app.use(errorHandler);

  const close = async () => {
    for (const fn of closers.reverse()) await fn();
  };
  return { app, ctx, close, lifecycle };
}

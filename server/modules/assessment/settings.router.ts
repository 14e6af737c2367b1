// Scoring weights and limits: every save is a new version; saving starts a rescore of every span.
import { scoringSettingsUpdateSchema } from '#shared/schemas/assessment.ts';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { AppError, parse } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import { ScoringSettingsVersion } from './profile.entity.ts';
import { currentSettings, settingsView } from './profiles.service.ts';
import { startRescore, waitForAssessmentDefaults } from './rescore.ts';

export function scoringSettingsRouter(ctx: AppContext) {
  const r = featureRouter('/api/settings/scoring');
  r.router.use(waitForAssessmentDefaults(ctx));

  r.get('/', 'signed-in', async (req, res) => {
    const { row } = await currentSettings(req.em);
    if (!row) throw AppError.notFound('Scoring settings');
    res.json(settingsView(row));
  });

  r.get('/history', ['admin'], async (req, res) => {
    const rows = await req.em.find(ScoringSettingsVersion, {}, { orderBy: { version: 'desc' }, limit: 50 });
    res.json({ items: rows.map(settingsView) });
  });

  r.put('/', ['admin'], async (req, res) => {
    const { version, settings } = parse(scoringSettingsUpdateSchema, req.body);
    const current = await currentSettings(req.em);
    if (current.version !== version) {
      throw AppError.conflict(`The settings were changed meanwhile (now version ${current.version}); reload and apply your edit again`, [
        { path: 'version', message: `Stale version ${version}; the settings are at version ${current.version}` },
      ]);
    }
    const row = req.em.create(ScoringSettingsVersion, { version: current.version + 1, settings, createdById: currentUser(req).id, createdAt: new Date() });
    audit(req.em, { actorId: currentUser(req).id, action: 'scoring-settings.update', recordType: 'scoring-settings', recordId: String(row.version), before: current.settings, after: settings });
    await req.em.flush();
    const job = await startRescore(ctx, `scoring settings version ${row.version}`);
    res.json({ ...settingsView(row), rescoreJobId: job.id });
  });

  return r.router;
}

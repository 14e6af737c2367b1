import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { MikroORM } from '@mikro-orm/sqlite';
import { initORM } from '../server/db.ts';
import type { EntityManager } from '@mikro-orm/core';
import { seedScaleAccounts } from '../server/seeders/index.ts';
import { sql } from '../server/sql/query.ts';

export interface BenchDatabase {
  orm: MikroORM;
  /** The SQLite file, in a temp folder of its own. */
  file: string;
  /** The demo surveyor, who records the seeded inventory. */
  surveyorId: string;
  /** Closes the database and removes its folder. */
  close: () => Promise<void>;
}

/** A fresh database for a bench: migrated, with the demo accounts and the default profiles and settings. */
export async function openBenchDatabase(name: string): Promise<BenchDatabase> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), `roostline-${name}-`));
  const file = path.join(dir, `${name}.sqlite`);
  const orm = await initORM(file);
  const close = async () => {
    await orm.close();
    fs.rmSync(dir, { recursive: true, force: true });
  };
  try {
    return { orm, file, surveyorId: await seedScaleAccounts(orm.em.fork()), close };
  } catch (err) {
    await close();
    throw err;
  }
}

/**
 * Gives every span without stored assessments a copy of one assessed span's rows, its score and harvest varied by
 * the span's length (so sorts and tiles see a spread). For figures that must not run beside the start-up rescore
 * (spans without an assessment are rescored when a server starts). Answers the number of spans filled.
 */
export async function fillAssessments(em: EntityManager, templateSpanId: string): Promise<number> {
  const res = await sql.run(
    em,
    `insert into assessments (span_id, harvester_profile_id, drone_profile_id, perchable, score, harvest_w, charge_time_min, conductor_temp_c, ampacity_a, result, inputs, method_version, settings_version, harvester_version, drone_version, computed_at)
     select s.id, a.harvester_profile_id, a.drone_profile_id, a.perchable, cast(s.length_m as integer) % 100, (cast(s.length_m as integer) % 400) / 3.0, a.charge_time_min, a.conductor_temp_c, a.ampacity_a, a.result, a.inputs, a.method_version, a.settings_version, a.harvester_version, a.drone_version, a.computed_at
     from spans s join assessments a on a.span_id = ? where not exists (select 1 from assessments x where x.span_id = s.id)`,
    [templateSpanId],
  );
  return res.affectedRows;
}

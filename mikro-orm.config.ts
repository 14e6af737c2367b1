// Used by the MikroORM CLI (`npm run mikro-orm -- …`); the app itself calls initORM() in server/db.ts.
import { loadConfig } from './server/env.ts';
import { ormOptions } from './server/db.ts';

export default ormOptions(loadConfig().databasePath);

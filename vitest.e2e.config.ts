import fs from 'node:fs';
import { defineConfig } from 'vitest/config';

// Browser journeys: a real server process on a temp SQLite file, driven by Debian's Chromium through playwright-core.
const chromium = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
const haveChromium = fs.existsSync(chromium);
if (!haveChromium) console.log(`Browser journeys skipped: no Chromium at ${chromium} (apt-get install -y chromium, or set CHROMIUM_PATH).`);

export default defineConfig({
  test: {
    include: haveChromium ? ['tests/e2e/**/*.e2e.ts'] : [],
    passWithNoTests: !haveChromium,
    environment: 'node',
    globalSetup: haveChromium ? ['tests/e2e/global-setup.ts'] : [],
    pool: 'forks',
    fileParallelism: false,
    testTimeout: 90_000,
    hookTimeout: 120_000,
  },
});

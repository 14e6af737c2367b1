import fs from 'node:fs';
import path from 'node:path';

export interface DiskSpace {
  /** What lives on this file system: "database", "uploads" or both. */
  holds: string[];
  freeBytes: number;
  totalBytes: number;
}

/** The nearest existing folder at or above `p` (the uploads folder may not exist yet). */
function existingDir(p: string): string {
  let dir = path.resolve(p);
  while (!fs.existsSync(dir)) {
    const up = path.dirname(dir);
    if (up === dir) break;
    dir = up;
  }
  return dir;
}

/** Free and total space of the file systems holding the database and the uploads (one entry when they share one). */
export async function diskSpace(places: { holds: string; dir: string }[]): Promise<DiskSpace[]> {
  const out = new Map<string, DiskSpace>();
  for (const { holds, dir } of places) {
    const st = await fs.promises.statfs(existingDir(dir));
    const id = `${st.type}:${st.blocks}:${st.bsize}`;
    const seen = out.get(id);
    if (seen) {
      seen.holds.push(holds);
      continue;
    }
    out.set(id, { holds: [holds], freeBytes: st.bavail * st.bsize, totalBytes: st.blocks * st.bsize });
  }
  return [...out.values()];
}

export function formatBytes(n: number): string {
  const units = ['bytes', 'KB', 'MB', 'GB', 'TB'];
  let i = 0;
  let v = n;
  while (v >= 1024 && i < units.length - 1) {
    v /= 1024;
    i++;
  }
  return `${i === 0 ? v : v.toFixed(v < 10 ? 1 : 0)} ${units[i]}`;
}

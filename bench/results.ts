// bench/RESULTS.md holds one section per bench that keeps its figures (between `<!-- name bench -->` markers); a run
// replaces its own section and leaves the others.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

/** The date, core count and load line every section opens with. */
export function machineLine(): string {
  const load = os.loadavg()[0];
  return `${new Date().toISOString().slice(0, 10)} · ${os.cpus().length} cores · load average ${load.toFixed(1)} at the end${load > os.cpus().length ? ' (shared machine, loaded figures)' : ' (quiet machine)'}.`;
}

/** Replaces (or appends) the section of bench `name` in bench/RESULTS.md. */
export function writeResultsSection(name: string, body: string) {
  const file = path.resolve('bench/RESULTS.md');
  const old = fs.existsSync(file) ? fs.readFileSync(file, 'utf8') : '';
  const open = `<!-- ${name} bench -->`;
  const close = `<!-- /${name} bench -->`;
  const esc = (s: string) => s.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&');
  const kept = old.replace(new RegExp(`\\n*${esc(open)}[\\s\\S]*${esc(close)}\\n?`), '');
  fs.writeFileSync(file, `${kept.trimEnd()}\n\n${open}\n${body.trimEnd()}\n${close}\n`);
}

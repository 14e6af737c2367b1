/** "3 d", "5 h", "12 min": how long ago, short. */
export function age(fromIso: string, now = Date.now()): string {
  const s = Math.max(0, (now - new Date(fromIso).getTime()) / 1000);
  if (s < 3600) return `${Math.max(1, Math.floor(s / 60))} min`;
  if (s < 86400) return `${Math.floor(s / 3600)} h`;
  return `${Math.floor(s / 86400)} d`;
}

export { dateTime } from '../../lib/format.ts';

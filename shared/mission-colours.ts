// Roostline's mission palette (the theme's night-teal ink, chalk, go green, brass and alarm red of src/index.css):
// one source for the plan map and the KML export, so a mission opened elsewhere looks like the app.
export const MISSION_COLOURS = {
  exclude: '#b3261e',
  caution: '#e8b04a',
  route: '#12343b',
  casing: '#f7f4ee',
  perch: '#2e7d4f',
  base: '#12343b',
  target: '#e8b04a',
} as const;

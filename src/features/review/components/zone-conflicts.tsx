import { useQuery } from '@tanstack/react-query';
import { booleanIntersects, lineString } from '@turf/turf';
import type { Feature, FeatureCollection, Polygon } from 'geojson';
import type { Span } from '#shared/schemas/inventory.ts';
import { api } from '../../../lib/api.ts';
import { inventoryQueries } from '../../spans/queries.ts';

interface ZoneProps {
  id: string;
  name: string;
  reason: string;
  severity: 'exclude' | 'caution';
  active: boolean;
}

const zonesQuery = { queryKey: ['zones', 'all'], queryFn: () => api.get<FeatureCollection<Polygon, ZoneProps>>('/api/zones'), staleTime: 60_000 };

/** Active no-perch zones the span crosses (from its two structures), and what the assessment's zone gate said. */
export function ZoneConflicts({ span }: { span: Span }) {
  const zones = useQuery(zonesQuery);
  const structures = useQuery(inventoryQueries.structures(span.lineId));
  const from = structures.data?.find((s) => s.id === span.fromStructureId);
  const to = structures.data?.find((s) => s.id === span.toStructureId);
  const gate = span.assessment?.gates?.find((g) => g.id === 'no-perch-zone');
  if (zones.isPending || structures.isPending) return <p className="text-sm text-ink-700">Checking zones…</p>;
  if (zones.error) return <p role="alert" className="field-error">Zones could not be loaded: {zones.error.message}</p>;
  let hits: Feature<Polygon, ZoneProps>[] = [];
  if (from && to && zones.data) {
    const line = lineString([
      [from.lon, from.lat],
      [to.lon, to.lat],
    ]);
    hits = zones.data.features.filter((z) => z.properties.active && booleanIntersects(line, z));
  }
  const excludes = hits.filter((z) => z.properties.severity === 'exclude');
  return (
    <div className="space-y-2" data-testid="zone-conflicts">
      {hits.length === 0 ? (
        <p className="font-semibold text-go">Crosses no active no-perch zone.</p>
      ) : (
        <ul className="space-y-1">
          {hits.map((z) => (
            <li key={z.properties.id} className={`rounded-lg p-2 text-sm ${z.properties.severity === 'exclude' ? 'bg-red-50 text-alarm' : 'bg-brass-100 text-ink-900'}`}>
              <strong>{z.properties.severity === 'exclude' ? 'Exclude zone' : 'Caution zone'}: {z.properties.name}</strong> — {z.properties.reason}
            </li>
          ))}
        </ul>
      )}
      {excludes.length > 0 && <p className="text-sm font-semibold text-alarm">A span inside an active exclude zone cannot be approved.</p>}
      {gate && (
        <p className="text-sm text-ink-700">
          Assessment zone gate: {gate.passed ? 'passed' : 'failed'}
          {gate.detail ? ` — ${gate.detail}` : ''}
        </p>
      )}
    </div>
  );
}

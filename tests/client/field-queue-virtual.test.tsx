// The surveyor's queue reaches every record: groups load page after page as the list scrolls, and only the cards
// near the screen are in the page. The API is answered by a fake server holding 5 returned, 45 draft and 450
// finished spans (more than two pages of the last group).
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { act, cleanup, render, screen, waitFor } from '@testing-library/react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { MemoryRouter } from 'react-router';
import type { Span, SpanStatus } from '#shared/schemas/inventory.ts';
import { MySpansQueue } from '../../src/features/field/components/my-spans-queue.tsx';

const CARD_PX = 96;

function spanOf(i: number, status: SpanStatus): Span {
  return {
    id: `SP${String(i).padStart(4, '0')}`, lineId: 'L1', lineName: 'Brackenridge feeder', fromStructureId: `S${i}`, toStructureId: `S${i + 1}`,
    fromStructureLabel: `B-${i}`, toStructureLabel: `B-${i + 1}`, status, version: 1, lengthM: 120,
    conductor: { codeWord: 'Hawk', size: '477 kcmil', material: 'ACSR', diameterMm: 21.79, resistanceLowOhmPerM: null, tempLowC: null, resistanceHighOhmPerM: null, tempHighC: null, source: 'catalogue' },
    phasePosition: null, clearanceM: 10, lowestClearanceM: 8, lowestClearanceAlongM: null, terrain: 'open-field', loadCurrentA: 300, loadCurrentSource: 'line',
    hazards: [], photoIds: [], surveyDate: '2026-05-01', surveyorId: 'U1', returnReason: status === 'returned' ? 'Measure the clearance again' : null, suspendReason: null,
    submittedAt: null, approvedAt: null, approvedById: null, assessment: null, createdAt: '2026-05-01T08:00:00Z', updatedAt: new Date(Date.UTC(2026, 4, 1) + (10_000 - i) * 60_000).toISOString(),
  } as Span;
}

const all: Span[] = [
  ...Array.from({ length: 5 }, (_, i) => spanOf(i, 'returned')),
  ...Array.from({ length: 45 }, (_, i) => spanOf(100 + i, 'draft')),
  ...Array.from({ length: 450 }, (_, i) => spanOf(1000 + i, i % 3 ? 'approved' : 'submitted')),
];
const asked: string[] = [];
const offsetHeight = Object.getOwnPropertyDescriptor(HTMLElement.prototype, 'offsetHeight')!;

beforeEach(() => {
  asked.length = 0;
  vi.stubGlobal('fetch', async (url: string) => {
    const u = new URL(url, 'http://localhost');
    asked.push(u.search);
    const statuses = (u.searchParams.get('status') ?? '').split(',');
    const page = Number(u.searchParams.get('page') ?? 1);
    const size = Number(u.searchParams.get('pageSize') ?? 50);
    const rows = all.filter((s) => statuses.includes(s.status));
    const body = { items: rows.slice((page - 1) * size, page * size), total: rows.length, page, pageSize: size };
    return new Response(JSON.stringify(body), { status: 200, headers: { 'content-type': 'application/json' } });
  });
  // jsdom lays nothing out: every element measures one card high, the window 800 px.
  Object.defineProperty(HTMLElement.prototype, 'offsetHeight', { configurable: true, get: () => CARD_PX });
  Object.defineProperty(window, 'innerHeight', { configurable: true, value: 800 });
});
afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
  vi.restoreAllMocks();
  Object.defineProperty(HTMLElement.prototype, 'offsetHeight', offsetHeight);
});

async function scrollTo(y: number) {
  await act(async () => {
    Object.defineProperty(window, 'scrollY', { configurable: true, value: y });
    window.dispatchEvent(new Event('scroll'));
  });
}

describe('field queue', () => {
  it('when the surveyor has 500 spans, then every group shows its full count, only cards near the screen are drawn, and scrolling to the end loads and shows the last one', async () => {
    const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
    client.setQueryData(['me'], { id: 'U1', email: 'surveyor@roostline.test', name: 'Ada Surveyor', role: 'surveyor', unitSystem: 'metric' });
    render(
      <QueryClientProvider client={client}>
        <MemoryRouter>
          <MySpansQueue />
        </MemoryRouter>
      </QueryClientProvider>,
    );
    await screen.findByText('(5)');
    expect(screen.getByText('(45)')).toBeTruthy();
    const drawn = document.querySelectorAll('[data-span-id]').length;
    expect(drawn).toBeGreaterThan(3);
    expect(drawn).toBeLessThan(40); // not 250 cards for the first page
    // The finished group's heading, 52 rows down, carries its full count though only its first page is loaded.
    await scrollTo(48 * CARD_PX);
    await screen.findByText('(450)');
    // Scroll down step by step to the end: pages 2 and 3 of the finished group are fetched on the way.
    for (let y = 0; y < 520 * CARD_PX; y += 20 * CARD_PX) await scrollTo(y);
    await waitFor(() => expect(asked.some((q) => q.includes('page=3'))).toBe(true));
    await scrollTo(520 * CARD_PX);
    const lastId = all[all.length - 1].id;
    await waitFor(() => expect(document.querySelector(`[data-span-id="${lastId}"]`)).not.toBeNull());
    expect(document.querySelectorAll('[data-span-id]').length).toBeLessThan(40);
  }, 60_000);
});

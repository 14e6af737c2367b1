import { describe, expect, it } from 'vitest';
import { commandForKey, orderQueue, queuedSince, waitingFor } from '../../src/features/review/queue.ts';

const span = (id: string, submittedAt: string | null, updatedAt = '2026-11-01T00:00:00Z') => ({ id, submittedAt, approvedAt: null, updatedAt });

describe('review queue order and age', () => {
  it('when spans wait in the review queue, then the longest-waiting comes first', () => {
    const q = orderQueue([span('b', '2026-11-20T10:00:00Z'), span('a', '2026-11-18T09:00:00Z'), span('c', null, '2026-11-19T00:00:00Z')], 'submitted');
    expect(q.map((s) => s.id)).toEqual(['a', 'c', 'b']);
  });

  it('when a span has no submission time, then the last change stands in', () => {
    expect(queuedSince(span('x', null, '2026-11-19T00:00:00Z'), 'submitted')).toBe('2026-11-19T00:00:00Z');
  });

  it('when the age is shown, then it is short and whole: minutes, hours, days', () => {
    const now = Date.parse('2026-12-02T12:00:00Z');
    expect(waitingFor('2026-12-02T11:48:00Z', now)).toBe('12 min');
    expect(waitingFor('2026-12-02T11:59:59Z', now)).toBe('1 min');
    expect(waitingFor('2026-12-02T07:00:00Z', now)).toBe('5 h');
    expect(waitingFor('2026-11-29T11:00:00Z', now)).toBe('3 d');
  });
});

describe('review keyboard', () => {
  it('when the reviewer presses a key outside a field, then it maps to a desk command', () => {
    expect(commandForKey({ key: 'j' }, false)).toBe('next');
    expect(commandForKey({ key: 'ArrowDown' }, false)).toBe('next');
    expect(commandForKey({ key: 'k' }, false)).toBe('previous');
    expect(commandForKey({ key: 'ArrowUp' }, false)).toBe('previous');
    expect(commandForKey({ key: 'a' }, false)).toBe('approve');
    expect(commandForKey({ key: 'r' }, false)).toBe('return');
    expect(commandForKey({ key: 's' }, false)).toBe('suspend');
    expect(commandForKey({ key: 'x' }, false)).toBeNull();
  });

  it('when the reviewer types in a field or holds a modifier, then only Escape is a command', () => {
    expect(commandForKey({ key: 'a' }, true)).toBeNull();
    expect(commandForKey({ key: 'j' }, true)).toBeNull();
    expect(commandForKey({ key: 'a', ctrlKey: true }, false)).toBeNull();
    expect(commandForKey({ key: 'r', metaKey: true }, false)).toBeNull();
    expect(commandForKey({ key: 'Escape' }, true)).toBe('cancel');
  });
});

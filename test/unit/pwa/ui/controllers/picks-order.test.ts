/**
 * Pure helpers of the picks table (pwa/ui/controllers/app-state.ts): added
 * picks merge into frequency order without reshuffling the crew's own rows,
 * sorting by frequency keeps ties in table order, and hand-entry messages
 * name the column by its heading's word, never by the CSV column name.
 * Values are invented.
 */
import { describe, expect, it } from 'vitest';
import { byFrequency, handEntryMessage, mergeByFrequency } from '../../../../../pwa/ui/controllers/app-state';

const p = (id: string, frequency: number) => ({ id, frequency });

describe('picks order', () => {
  it('merges added picks into a table in frequency order, each before the first higher frequency', () => {
    const old = [p('a', 4), p('b', 8), p('c', 16)];
    const merged = mergeByFrequency(old, [p('x', 20), p('y', 2), p('z', 10)]);
    expect(merged.map((q) => q.id)).toEqual(['y', 'a', 'b', 'z', 'c', 'x']);
  });

  it('keeps the crew’s own order of a table that is not sorted', () => {
    const old = [p('a', 9), p('b', 3)];
    // 5 Hz goes before the first pick of a higher frequency (a, 9 Hz); b stays after a.
    expect(mergeByFrequency(old, [p('x', 5)]).map((q) => q.id)).toEqual(['x', 'a', 'b']);
  });

  it('sorts by frequency, ties in table order', () => {
    expect(byFrequency([p('a', 8), p('b', 2), p('c', 8), p('d', 1)]).map((q) => q.id)).toEqual(['d', 'b', 'a', 'c']);
  });

  it('names columns as the table does in hand-entry messages', () => {
    expect(handEntryMessage('Pick 3, column sd_m_s: must be greater than 0 m/s, but it is -1.')).toBe('Pick 3, sd: must be greater than 0 m/s, but it is -1.');
    expect(handEntryMessage('Pick 1, column period_s: is empty.')).toBe('Pick 1, period: is empty.');
    expect(handEntryMessage('give velocity_m_s in m/s')).toBe('give velocity in m/s');
  });
});

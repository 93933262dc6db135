/**
 * The figures view's range text (pwa/ui/views/figures-view.tsx): an end the
 * data do not bound (issue 9 §2) is never printed as a bound; the text says
 * "at least" or "at most" the other end and names the model's limit apart.
 * Ranges are hand-made here (no estimate needed).
 */
import { describe, expect, it } from 'vitest';
import { rangeText } from '../../../../../pwa/ui/views/figures-view';

describe('figures view range text', () => {
  it('prints an ordinary 95 % range as low to high', () => {
    expect(rangeText({ best: 400, low: 380, high: 420 }, 'm/s')).toBe('400 m/s (95 %: 380 to 420 m/s)');
  });
  it('says "at most" when the low end is open, and "at least" when the high end is', () => {
    expect(rangeText({ best: 400, low: 250, high: 530, openLow: true }, 'm/s')).toBe(
      "400 m/s (95 %: at most 530 m/s, not bounded below by the data; the model's limit is 250 m/s)",
    );
    expect(rangeText({ best: 5, low: 3, high: Infinity, openHigh: true }, 'Hz')).toBe('5 Hz (95 %: at least 3 Hz, not bounded above by the data)');
  });
  it('says "not bounded by the data" when both ends are open', () => {
    expect(rangeText({ best: 400, low: 30, high: 5000, openLow: true, openHigh: true }, 'm/s')).toBe(
      "400 m/s (not bounded by the data; the model's limits are 30 to 5000 m/s)",
    );
  });
});

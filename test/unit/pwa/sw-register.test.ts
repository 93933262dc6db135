/**
 * The update prompt's plumbing (pwa/sw-register.ts): a waiting version is
 * announced to every listener, late listeners hear of it at once, and the
 * switch happens only when `apply` is called (once), with the reload after
 * the new worker controls the page. Outside a production build nothing
 * registers.
 */
import { describe, expect, it, vi } from 'vitest';
import { onUpdateReady, registration, watchForUpdates, type UpdateSource } from '../../../pwa/sw-register';

class FakeWorkbox implements UpdateSource {
  readonly handlers: Record<string, (() => void)[]> = { waiting: [], controlling: [] };
  skipWaitingMessages = 0;
  addEventListener(type: 'waiting' | 'controlling', listener: () => void): void {
    this.handlers[type].push(listener);
  }
  messageSkipWaiting(): void {
    this.skipWaitingMessages++;
  }
  fire(type: 'waiting' | 'controlling'): void {
    for (const h of this.handlers[type]) h();
  }
}

describe('the update-ready plumbing', () => {
  it('registers nothing outside a production build', () => {
    expect(registration).toBeUndefined();
  });

  it('announces a waiting version, and switches only when the user applies it', () => {
    const wb = new FakeWorkbox();
    const reload = vi.fn();
    watchForUpdates(wb, reload);
    const early = vi.fn();
    const stop = onUpdateReady(early);
    expect(early).not.toHaveBeenCalled();

    wb.fire('waiting');
    expect(early).toHaveBeenCalledTimes(1);
    expect(wb.skipWaitingMessages).toBe(0); // nothing happens until the user agrees

    const late = vi.fn();
    onUpdateReady(late);
    expect(late).toHaveBeenCalledTimes(1); // a listener added later still hears of it
    const apply = late.mock.calls[0][0] as () => void;
    expect(apply).toBe(early.mock.calls[0][0]);

    apply();
    apply();
    expect(wb.skipWaitingMessages).toBe(1);
    expect(reload).not.toHaveBeenCalled(); // not before the new worker controls the page
    wb.fire('controlling');
    expect(reload).toHaveBeenCalledTimes(1);
    stop();
  });
});

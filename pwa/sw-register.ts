/// <reference types="vite/client" />
/**
 * Registers the service worker (production builds only) and tells the page
 * when a new version is ready.
 *
 * The update is never applied by itself: `onUpdateReady(cb)` calls `cb`
 * with an `apply` function once a new version has installed and is
 * waiting. The UI shows a prompt; only when the user agrees (after flushing
 * any edit in progress) does it call `apply()`, which lets the new worker
 * take over and reloads the page once it controls it.
 */
import { Workbox } from 'workbox-window';

/** Called when an update is waiting; call `apply` to switch to it (reloads the page). */
export type UpdateReadyListener = (apply: () => void) => void;

/** The part of workbox-window's Workbox this module uses (a fake in tests). */
export interface UpdateSource {
  addEventListener(type: 'waiting' | 'controlling', listener: () => void): void;
  messageSkipWaiting(): void;
}

const listeners = new Set<UpdateReadyListener>();
let waitingApply: (() => void) | undefined;

/**
 * Subscribes to "a new version is ready". If one is already waiting, `cb`
 * is called at once. Returns a function that unsubscribes.
 */
export function onUpdateReady(cb: UpdateReadyListener): () => void {
  listeners.add(cb);
  if (waitingApply) cb(waitingApply);
  return () => listeners.delete(cb);
}

/**
 * Wires an update source: on `waiting`, every listener gets `apply`.
 * `apply` (once, however often called) asks the waiting worker to take
 * over and calls `reload` when it controls the page, so the reload is
 * served by the new version.
 */
export function watchForUpdates(source: UpdateSource, reload: () => void = () => window.location.reload()): void {
  source.addEventListener('waiting', () => {
    let applied = false;
    waitingApply = () => {
      if (applied) return;
      applied = true;
      source.addEventListener('controlling', reload);
      source.messageSkipWaiting();
    };
    for (const cb of listeners) cb(waitingApply);
  });
}

/** The registration promise (undefined in development or where service workers are unavailable). */
export let registration: Promise<ServiceWorkerRegistration | undefined> | undefined;

if (import.meta.env.PROD && typeof navigator !== 'undefined' && 'serviceWorker' in navigator) {
  const wb = new Workbox(`${import.meta.env.BASE_URL}sw.js`, { scope: import.meta.env.BASE_URL });
  // `waiting` fires both for a fresh update and for one left waiting by an earlier visit.
  watchForUpdates(wb);
  registration = wb.register();
  // Look for a new version whenever the app comes back to the foreground.
  document.addEventListener('visibilitychange', () => {
    if (document.visibilityState === 'visible') void wb.update().catch(() => undefined);
  });
}

/**
 * What the sync panel says, from the client's status (client.ts): one
 * headline that never claims "up to date" while anything waits, the last
 * attempt's outcome, and whether "Sync now" may be pressed (with the reason
 * when not). Pure: no DOM, no store; the panel passes the time formatter.
 */
import type { SyncStatus } from './client';

export interface SyncWords {
  /** One line for the state. */
  headline: string;
  /** "Waiting to send: N" (with the demo site's held records when there are any). */
  waiting: string;
  /** The last attempt: when and how it went; '' when there was none. */
  lastAttempt: string;
  /** Whether the last attempt failed (the panel shows it as a problem). */
  lastAttemptFailed: boolean;
  /** Whether "Sync now" may be pressed. */
  canSyncNow: boolean;
  /** Why not, in plain words ('' when it may). */
  syncNowBlocked: string;
}

function plural(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`;
}

/**
 * The panel's words for a status. `online` is the device's own view
 * (navigator.onLine); `when` formats an ISO time in the device's local time.
 */
export function syncWords(status: SyncStatus, online: boolean, when: (iso: string) => string): SyncWords {
  const n = status.pending;
  const waiting =
    `Waiting to send: ${n}` +
    (status.heldDemo > 0 ? ` (and ${plural(status.heldDemo, 'record', 'records')} of the invented demo site, kept on this tablet)` : '');
  const a = status.lastAttempt;
  const lastAttempt = a ? `${when(a.at)}: ${a.ok ? a.message : `failed. ${a.message}`}` : '';
  const lastAttemptFailed = a ? !a.ok : false;

  let headline: string;
  if (status.state === 'not-set-up') {
    headline = n > 0 ? `Not set up: ${plural(n, 'change waits', 'changes wait')} on this tablet until an office address and token are entered.` : 'Not set up: enter the office address and this tablet’s token.';
  } else if (!online || status.state === 'offline') {
    // Before "syncing": an attempt that starts while the device says it is offline (a timer, a reload) cannot reach the office.
    headline = n > 0 ? `Offline: ${plural(n, 'change waits', 'changes wait')} on this tablet and will be sent when the office can be reached.` : 'Offline: nothing is waiting to be sent.';
  } else if (status.state === 'syncing') {
    headline = 'Syncing with the office now…';
  } else if (status.state === 'error' || lastAttemptFailed) {
    headline = n > 0 ? `Not sent: the last attempt failed, and ${plural(n, 'change waits', 'changes wait')} on this tablet; sync will try again.` : 'The last attempt failed; sync will try again.';
  } else if (n > 0) {
    headline = `${plural(n, 'change waits', 'changes wait')} to be sent; sync sends ${n === 1 ? 'it' : 'them'} next.`;
  } else if (status.lastSuccess) {
    headline = `Up to date: nothing waiting to be sent; last sync ${when(status.lastSuccess)}.`;
  } else {
    headline = 'Nothing waiting to be sent; this tablet has not synced with the office yet.';
  }

  let syncNowBlocked = '';
  if (status.state === 'not-set-up') syncNowBlocked = 'Enter the office address and token first.';
  else if (!online) syncNowBlocked = 'This device is offline; sync starts by itself when the connection returns.';
  else if (status.state === 'syncing') syncNowBlocked = 'A sync is running.';
  return { headline, waiting, lastAttempt, lastAttemptFailed, canSyncNow: syncNowBlocked === '', syncNowBlocked };
}

/**
 * The office store's "another writer holds it" case, apart from the store
 * itself so that the command line's dispatcher can recognise it without
 * loading SQLite (office/cli.ts starts faster that way).
 */

/** How long a command waits for another writer (the server, another command) before giving up, ms. */
export const DEFAULT_BUSY_TIMEOUT_MS = 30_000;

/** True for SQLite's "another connection holds the lock" errors (SQLITE_BUSY…, SQLITE_LOCKED…). */
export function isBusyError(e: unknown): boolean {
  const code = (e as { code?: unknown } | null)?.code;
  return typeof code === 'string' && (code.startsWith('SQLITE_BUSY') || code.startsWith('SQLITE_LOCKED'));
}

/** The sentence a command prints when the store stayed locked by another writer past the busy timeout. */
export function busyMessage(waitMs = DEFAULT_BUSY_TIMEOUT_MS): string {
  return `The office store stayed busy with another writer (the office server or another shearfield command) for ${Math.round(waitMs / 1000)} s, so this step saved nothing; try again.`;
}


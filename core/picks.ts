/**
 * Dispersion picks: the shared shape. The CSV parser and its rules join this
 * file (issue 3 §1).
 */

export type PickKind = 'group' | 'phase';

/** One dispersion pick, in SI units. */
export interface Pick {
  /** Stable id, when the pick came from a store or a file that had one. */
  id?: string;
  /** Frequency, Hz (always set; a pick entered as a period has frequency = 1/period). */
  frequency: number;
  /** The period in s, when the pick was entered as a period (kept so files round-trip exactly). */
  period?: number;
  /** Velocity, m/s. */
  velocity: number;
  /** Which velocity was picked. @default 'group' */
  kind: PickKind;
  /** Mode number, 0 = fundamental. @default 0 */
  mode: number;
  /** One standard deviation of the velocity, m/s, when the pick gave one. */
  sd?: number;
  /** Free text. Shown as text, never as markup. */
  note?: string;
  /** When the pick was made, ISO 8601 text, if known. */
  time?: string;
}

/**
 * Standard deviation used when a pick gives none: this fraction of the
 * velocity. Common practice for surface-wave picks (a few per cent); not
 * from a published standard. Every output that used it says so.
 */
export const DEFAULT_SD_FRACTION = 0.03;

/** The pick's standard deviation in m/s: its own, or the default fraction of its velocity. */
export function effectiveSd(pick: Pick): number {
  return pick.sd !== undefined ? pick.sd : DEFAULT_SD_FRACTION * pick.velocity;
}

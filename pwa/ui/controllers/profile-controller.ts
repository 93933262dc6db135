/**
 * The layered estimate of the open site (the `profile` slice of the state):
 * run on request in the compute worker (it takes a second or more, so it
 * does not follow every edit), with a progress bar and cancel; a new run or
 * a closed site aborts the old one (the worker is stopped). Settings: the
 * number of layers (or let the picks decide), Poisson's ratio and the
 * water-table depth for Rayleigh picks, checked by the core; a refused
 * setting keeps the typed text and changes nothing stored.
 */
import type { ProfileResult } from '../../../core/profile/profile-estimate';
import { checkPoisson, checkWaterTable } from '../../../core/profile/p-speed';
import type { Pick } from '../../../core/picks/picks';
import { pickOf } from '../../store';
import { computeProfile, type WorkerProfileOptions } from '../../worker/bridge';
import { messageOf, type StateHub } from './state-hub';

/** How the app runs the layered estimate (the worker bridge in the app; tests may pass their own). */
export type ProfileRunner = (
  picks: readonly Pick[],
  options: WorkerProfileOptions,
  onProgress: (fraction: number) => void,
  signal: AbortSignal,
) => Promise<ProfileResult>;

/** The settings form's words for each option, so messages name the fields as the crew sees them. */
const FIELD_LABELS: WorkerProfileOptions['fieldLabels'] = {
  layers: 'Number of layers',
  poisson: "Poisson's ratio",
  waterTableDepth: 'Water-table depth',
  picks: 'The picks',
};

/** The run's options from the form text; throws the core's InputError for a bad field. */
export function profileOptions(layers: number | 'auto', poissonText: string, waterText: string, pickCount: number): WorkerProfileOptions {
  const o: WorkerProfileOptions = {
    layers,
    fieldLabels: FIELD_LABELS,
    pickLabels: Array.from({ length: pickCount }, (_, i) => `pick ${i + 1}`),
  };
  const number = (text: string) => (text.trim() === '' ? undefined : Number(text.trim().replace(',', '.')));
  const nu = number(poissonText);
  if (nu !== undefined) o.poisson = checkPoisson(nu, "Poisson's ratio");
  const wt = number(waterText);
  if (wt !== undefined) o.waterTableDepth = checkWaterTable(wt, 'Water-table depth');
  return o;
}

export class ProfileController {
  private abortRun?: AbortController;

  private siteId?: string;

  constructor(
    private readonly hub: StateHub,
    private readonly runner: ProfileRunner = (p, o, on, s) => computeProfile(p, o, on, s),
  ) {
    // Another site (or none) opens: the running estimate stops and the result goes.
    hub.subscribe((s) => {
      if (s.openSiteId === this.siteId) return;
      this.siteId = s.openSiteId;
      if (s.profile.status !== 'idle' || s.profile.result) this.reset();
    });
  }

  /** Changes a setting (kept as typed; checked when the estimate runs). */
  setSettings(patch: Partial<{ layers: number | 'auto'; poissonText: string; waterTableText: string }>): void {
    const p = this.hub.current.profile;
    this.hub.set({ profile: { ...p, ...patch, error: undefined } });
  }

  /** Stops the running estimate (the worker is stopped); the last result stays. */
  cancel(): void {
    if (!this.abortRun) return;
    this.abortRun.abort();
    this.abortRun = undefined;
    const p = this.hub.current.profile;
    this.hub.set({ profile: { ...p, status: p.result ? 'done' : 'idle', progress: 0, error: 'The layered estimate was cancelled.' } });
  }

  /** Forgets the result (another site opens). */
  reset(): void {
    this.abortRun?.abort();
    this.abortRun = undefined;
    const p = this.hub.current.profile;
    this.hub.set({ profile: { ...p, status: 'idle', progress: 0, result: undefined, error: undefined } });
  }

  /** Runs the layered estimate of the open site's picks in the worker. */
  async run(): Promise<void> {
    const s = this.hub.current;
    if (!s.openSiteId) return;
    const p = s.profile;
    let options: WorkerProfileOptions;
    try {
      options = profileOptions(p.layers, p.poissonText, p.waterTableText, s.picks.length);
    } catch (e) {
      this.hub.set({ profile: { ...p, error: messageOf(e) } });
      return;
    }
    this.abortRun?.abort();
    const abort = new AbortController();
    this.abortRun = abort;
    const picks = s.picks.map(pickOf);
    this.hub.set({ profile: { ...p, status: 'running', progress: 0, error: undefined } });
    try {
      const result = await this.runner(
        picks,
        options,
        (f) => {
          if (!abort.signal.aborted) this.hub.set({ profile: { ...this.hub.current.profile, progress: f } });
        },
        abort.signal,
      );
      if (abort.signal.aborted) return;
      this.abortRun = undefined;
      this.hub.set({ profile: { ...this.hub.current.profile, status: 'done', progress: 1, result } });
    } catch (e) {
      if (abort.signal.aborted || (e as { name?: string })?.name === 'AbortError') return;
      this.abortRun = undefined;
      this.hub.set({ profile: { ...this.hub.current.profile, status: 'error', progress: 0, error: messageOf(e) } });
    }
  }
}

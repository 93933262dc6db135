/**
 * The app shell: header, notices, the update prompt, and either the site
 * list or the open site's work (picks and plot, estimate, site figures,
 * what-if, survey plan, details).
 */
import { CAUTION } from '../../core/shared/caution';
import { useEffect, useMemo, useState } from 'preact/hooks';
import type { LayeredModel } from '../../core/dispersion/model';
import { PlotPanel } from './charts/plot-panel';
import type { AppController } from './controllers/app-controller';
import type { AppState, ViewName } from './controllers/app-state';
import { ImportPanel, PicksTable } from './views/picks-table';
import { RecordingsPanel } from './views/recordings-panel';
import { SiteDetails } from './views/site-details';
import { SitesView } from './views/sites-view';
import { SyncPanel } from './views/sync-panel';
import { bestFitCaption } from './views/verdict-text';

type WorkViews = typeof import('./views/work-views');
let workViews: Promise<WorkViews> | undefined;
/** Loads the later site views once (they are a chunk of their own). */
function loadWorkViews(): Promise<WorkViews> {
  workViews ??= import('./views/work-views');
  return workViews;
}

/** The later site views, once loaded; undefined until then (or with the load error). */
function useWorkViews(): { views?: WorkViews; error?: string } {
  const [state, setState] = useState<{ views?: WorkViews; error?: string }>({});
  useEffect(() => {
    let live = true;
    loadWorkViews().then(
      (views) => live && setState({ views }),
      (e) => live && setState({ error: `This view could not load: ${e instanceof Error ? e.message : String(e)}` }),
    );
    return () => {
      live = false;
    };
  }, []);
  return state;
}

/** The state of a controller, re-rendered on every change. */
function useAppState(c: AppController): AppState {
  const [s, setS] = useState(c.current);
  useEffect(() => c.subscribe(setS), [c]);
  return s;
}

/** Each view's name, and the short word the phone's one row of tabs shows. */
const VIEWS: { id: ViewName; label: string; short: string }[] = [
  { id: 'picks', label: 'Picks & plot', short: 'Picks' },
  { id: 'records', label: 'Records', short: 'Records' },
  { id: 'estimate', label: 'Estimate', short: 'Result' },
  { id: 'profile', label: 'Layered profile', short: 'Layers' },
  { id: 'figures', label: 'Site figures', short: 'Figures' },
  { id: 'whatif', label: 'What-if', short: 'What-if' },
  { id: 'survey', label: 'Survey plan', short: 'Plan' },
  { id: 'details', label: 'Site details', short: 'Details' },
];

function Mark() {
  // Own mark: a wave train over a two-tone layered block.
  return (
    <svg class="mark" viewBox="0 0 32 32" width="32" height="32" aria-hidden="true">
      <rect x="2" y="17" width="28" height="6" fill="currentColor" opacity="0.55" />
      <rect x="2" y="23" width="28" height="7" fill="currentColor" />
      <path d="M2 11 q3.5 -6 7 0 t7 0 t7 0 t7 0" fill="none" stroke="currentColor" stroke-width="2.5" />
    </svg>
  );
}

export interface AppProps {
  controller: AppController;
}

export function App({ controller: c }: AppProps) {
  const s = useAppState(c);
  const site = s.sites.find((x) => x.id === s.openSiteId);

  useEffect(() => {
    document.documentElement.dataset.theme = s.theme;
  }, [s.theme]);

  return (
    <div class="shell">
      <header class="top">
        <div class="brand">
          <Mark />
          <span>Shearfield</span>
        </div>
        <span class={`net ${s.online ? 'on' : 'off'}`} role="status">
          {s.online ? (
            'Online'
          ) : (
            <>
              <span class="long-label">Offline: all work is kept on this device</span>
              <span class="short-label">Offline: kept here</span>
            </>
          )}
        </span>
        <button
          type="button"
          class="theme"
          aria-label="Sunlight contrast"
          aria-pressed={s.theme === 'sun'}
          onClick={() => void c.settings.setTheme(s.theme === 'sun' ? 'standard' : 'sun')}
        >
          <span class="long-label">Sunlight contrast</span>
          <span class="short-label">Sunlight</span>
        </button>
      </header>

      {s.updateReady ? (
        <section class="update" aria-labelledby="upd-h" aria-describedby="upd-p" aria-live="polite">
          <h2 id="upd-h">A new version of the app is ready</h2>
          <p id="upd-p">Everything you typed is saved first; rows with unsaved corrections hold the update back.</p>
          <button type="button" class="primary" onClick={() => void c.settings.applyUpdate()}>
            Update now
          </button>
          <button type="button" onClick={() => c.settings.dismissUpdate()}>
            Later
          </button>
        </section>
      ) : null}

      <div class="notices" aria-live="polite">
        {s.notices.map((n) => (
          <div key={n.id} class={`notice ${n.tone}`} role={n.tone === 'error' ? 'alert' : 'status'}>
            <span>{n.text}</span>
            <button type="button" class="icon" aria-label="Dismiss this message" onClick={() => c.dismiss(n.id)}>
              ×
            </button>
          </div>
        ))}
      </div>

      <main id="main">
        {!s.ready || s.fatal ? (
          <>
            <h1 class="page-title">Field sites</h1>
            {s.fatal ? (
              <p class="error" role="alert">
                {s.fatal}
              </p>
            ) : (
              <p class="status" role="status">
                Opening the on-device store…
              </p>
            )}
          </>
        ) : site ? (
          <SiteWork s={s} c={c} />
        ) : (
          <>
            <h1 class="page-title">Field sites</h1>
            <SitesView
              sites={s.sites}
              facts={s.siteFacts}
              query={s.siteQuery}
              sort={s.siteSort}
              error={s.siteError}
              onQuery={(q) => c.sites.setSiteQuery(q)}
              onSort={(x) => c.sites.setSiteSort(x)}
              onCreate={(name) => c.sites.createSite(name)}
              onOpen={(id, view) => c.sites.openSite(id, view)}
              onDemo={() => void c.sites.loadDemo()}
            />
            <SyncPanel state={s.sync} sync={c.sync} online={s.online} />
          </>
        )}
      </main>
    </div>
  );
}

function fittedModel(s: AppState): LayeredModel | undefined {
  const r = s.estimate.result;
  if (!r) return undefined;
  return {
    layers: [{ thickness: r.thickness.best, vs: r.vs1.best, density: r.density1 }],
    halfspace: { vs: r.vs2.best, density: r.density2 },
  };
}

function SiteWork({ s, c }: { s: AppState; c: AppController }) {
  const site = s.sites.find((x) => x.id === s.openSiteId)!;
  const fitted = useMemo(() => fittedModel(s), [s.estimate.result]);
  const { views, error: viewsError } = useWorkViews();
  const waiting =
    viewsError ? (
      <p class="error" role="alert">
        {viewsError}
      </p>
    ) : (
      <p class="status" role="status">
        Loading the view…
      </p>
    );
  // After a layered estimate the picks plot draws its best-fit curves (Love and/or Rayleigh), faint when not resolved.
  const best = s.layered.best;
  const layeredCurves = useMemo(
    () =>
      best.result && best.band && best.caption
        ? { band: best.band, curves: best.result.curves, unsupported: best.verdict?.level === 'unresolved' }
        : undefined,
    [best.result, best.band, best.caption, best.verdict],
  );
  const estimateCaption = layeredCurves
    ? `${best.caption} ${CAUTION}`
    : s.estimate.status === 'running'
      ? 'Best-fit curves: computing…'
      : s.estimate.result
        ? `${bestFitCaption(s.estimate.result.thickness, s.estimate.result.verdict)} ${CAUTION}`
        : 'Best-fit curves appear once the estimate is ready.';
  return (
    <>
      <div class="site-head">
        <button type="button" aria-label="← All sites" onClick={() => c.sites.closeSite()}>
          <span class="long-label">← All sites</span>
          <span class="short-label">← Sites</span>
        </button>
        <h1 class="page-title">{site.name || '(unnamed site)'}</h1>
      </div>
      <nav class="views" aria-label="Site work">
        {VIEWS.map((v) => (
          <button
            type="button"
            key={v.id}
            aria-label={v.label}
            aria-current={s.view === v.id ? 'page' : undefined}
            onClick={() => c.sites.setView(v.id)}
          >
            <span class="long-label">{v.label}</span>
            <span class="short-label">{v.short}</span>
          </button>
        ))}
      </nav>
      {s.view === 'picks' ? (
        <div class="split">
          <div class="col">
            <PicksTable
              picks={s.picks}
              drafts={s.drafts}
              unit={site.axisUnit}
              selectedId={s.selectedPickId}
              undo={s.undo}
              onEdit={(r, col, t) => c.picks.editCell(r, col, t)}
              onCommit={(r, force) => void c.picks.commitRow(r, force)}
              onKind={(r, k, m) => void c.picks.setKind(r, k, m)}
              onSort={() => void c.picks.sortByFrequency()}
              onExport={() => void c.picks.exportPicksCsv()}
              onWave={(r, w) => void c.picks.setWave(r, w)}
              onDelete={(id) => void c.picks.deletePick(id)}
              onDiscard={(r) => c.picks.discardDraft(r)}
              onSelect={(id) => c.picks.selectPick(id)}
              onUnit={(u) => void c.settings.setAxisUnit(u)}
              onUndo={() => void c.picks.undo()}
            />
            <ImportPanel
              state={s.importState}
              onText={(t) => c.imports.setImportText(t)}
              onReplace={(r) => c.imports.setImportReplace(r)}
              onImport={(t, src) => void c.imports.importCsv(t, src)}
              onFile={(f) => void c.imports.importFile(f)}
            />
          </div>
          <PlotPanel
            id="plot-h"
            picks={s.picks}
            model={layeredCurves ? undefined : fitted}
            computed={layeredCurves}
            curveLabel={layeredCurves ? 'layered best fit' : 'best fit'}
            caption={estimateCaption}
            selectedId={s.selectedPickId}
            settings={s.plot}
            theme={s.theme}
            onSelect={(id) => c.picks.selectPick(id)}
            onSettings={(p) => c.settings.setPlot(p)}
          />
        </div>
      ) : s.view !== 'details' && !views ? (
        waiting
      ) : s.view === 'estimate' && views ? (
        <views.EstimateView
          site={site}
          drafts={s.siteDraft}
          error={s.siteError}
          estimate={s.estimate}
          pickCount={s.picks.length}
          theme={s.theme}
          onEdit={(k, t) => c.settings.editSetting(k, t)}
          onCommit={(k) => void c.settings.commitSetting(k)}
          onKnown={(w, known, sug) => void c.settings.setKnown(w, known, sug)}
          onRun={() => void c.estimates.estimateNow()}
          onSurvey={() => c.sites.setView('survey')}
        />
      ) : s.view === 'records' && views ? (
        <views.RecordsView
          siteId={site.id}
          state={s.records}
          keptIds={s.recordings.siteId === site.id ? new Set(s.recordings.list.map((r) => r.id)) : undefined}
          picks={s.picks}
          model={fitted}
          estimate={s.estimate}
          layered={layeredCurves}
          layeredCaption={best.caption}
          plot={s.plot}
          theme={s.theme}
          records={c.records}
          ridge={c.ridge}
          onPlot={(p) => c.settings.setPlot(p)}
        />
      ) : s.view === 'profile' && views ? (
        <views.ProfileView
          profile={s.profile}
          pickCount={s.picks.length}
          rayleighCount={s.picks.filter((p) => p.wave === 'rayleigh').length}
          onSettings={(patch) => c.profiles.setSettings(patch)}
          onRun={() => void c.profiles.run()}
          onCancel={() => c.profiles.cancel()}
        />
      ) : s.view === 'figures' && views ? (
        <views.FiguresView
          result={s.estimate.result}
          running={s.estimate.status === 'running'}
          onSurvey={() => c.sites.setView('survey')}
          site={site}
          picks={s.picks}
        />
      ) : s.view === 'whatif' && views ? (
        <>
          <div class="seg whatif-tabs" role="group" aria-label="What-if model">
            <button type="button" aria-pressed={s.layered.tab === 'one'} onClick={() => c.layered.setTab('one')}>
              One layer (sliders)
            </button>
            <button type="button" aria-pressed={s.layered.tab === 'layers'} onClick={() => c.layered.setTab('layers')}>
              Layer builder
            </button>
          </div>
          {s.layered.tab === 'layers' ? (
            <views.LayerBuilderView
              state={s.layered}
              picks={s.picks}
              hasProfile={!!s.profile.result}
              hasEstimate={!!s.estimate.result}
              profileRunning={s.profile.status === 'running'}
              bestFit={layeredCurves}
              selectedId={s.selectedPickId}
              plot={s.plot}
              theme={s.theme}
              layered={c.layered}
              onSelect={(id) => c.picks.selectPick(id)}
              onPlot={(p) => c.settings.setPlot(p)}
            />
          ) : (
            <views.WhatIfView
              model={s.whatif}
              result={s.estimate.result}
              picks={s.picks}
              selectedId={s.selectedPickId}
              plot={s.plot}
              theme={s.theme}
              onModel={(m) => c.settings.setWhatIf(m)}
              onSelect={(id) => c.picks.selectPick(id)}
              onPlot={(p) => c.settings.setPlot(p)}
            />
          )}
        </>
      ) : s.view === 'survey' && views ? (
        <views.SurveyView depthText={s.surveyDepth} picks={s.picks} result={s.estimate.result} onDepth={(t) => c.settings.setSurveyDepth(t)} />
      ) : (
        <>
          <SiteDetails
            site={site}
            drafts={s.siteDraft}
            error={s.siteError}
            locating={s.locating}
            onEdit={(f, t) => c.sites.editSiteField(f, t)}
            onCommit={(f) => void c.sites.commitSiteField(f)}
            onLocate={() => c.sites.locate()}
            onDelete={() => void c.sites.deleteOpenSite()}
          />
          <RecordingsPanel state={s.recordings} recordings={c.recordings} />
        </>
      )}
    </>
  );
}

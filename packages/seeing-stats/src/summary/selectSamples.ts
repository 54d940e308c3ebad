import { filterReason, type FilterSettings } from '../log/filterReason.js';
import type { SortedSeeing } from './summarizeSeeing.js';

/**
 * One run of stored samples (a campaign's), as columns in time order. Missing sun altitudes and fluxes are NaN.
 * Only the first `count` entries are read.
 */
export interface StoredSampleColumns {
  count: number;
  timeMs: Float64Array;
  seeingArcsec: Float64Array;
  zenithDeg: Float64Array;
  sunAltDeg: Float64Array;
  flux: Float64Array;
  /** 1 where the sample was flagged anisotropic at reading (variance inputs), 0 otherwise; absent: not known. */
  anisotropic?: Uint8Array;
  /** Coherence time τ0 at zenith and 500 nm, NaN where not logged; absent when the run has none. */
  tau0Ms?: Float64Array;
  /** Isoplanatic angle θ0 at zenith and 500 nm, NaN where not logged; absent when the run has none. */
  theta0Arcsec?: Float64Array;
}

/** A window of excluded samples: fromMs inclusive, toMs exclusive. */
export interface ExcludedWindow {
  fromMs: number;
  toMs: number;
}

/** A run of stored samples and the windows excluded from it. */
export interface SampleRun<Columns extends StoredSampleColumns = StoredSampleColumns> {
  columns: Columns;
  exclusions: readonly ExcludedWindow[];
}

/** A run with the sort of its whole seeing column (sortPositive of seeingArcsec[0..count)), made once and kept. */
export interface SortedSampleRun<Columns extends StoredSampleColumns = StoredSampleColumns> extends SampleRun<Columns> {
  seeingSort: SortedSeeing;
}

/** Which samples to take: a time range (fromMs inclusive, toMs exclusive; null = open) and the filter settings. */
export interface SampleQuery {
  fromMs: number | null;
  toMs: number | null;
  filters: FilterSettings;
}

/** Why a stored sample is left out, in the order they are checked: exclusion first, then filterReason's order. */
export const SELECTION_REASONS = ['excluded_window', 'zenith_limit', 'sun_above_limit', 'low_flux', 'anisotropic'] as const;
export type SelectionReason = (typeof SELECTION_REASONS)[number];
const NO_REJECTION = 255;

/** One run's part of a query. */
export interface RunSelection<Columns extends StoredSampleColumns = StoredSampleColumns> {
  columns: Columns;
  /** Stored samples in the time range. */
  stored: number;
  /** Indices of the accepted samples, ascending (time order). */
  accepted: Uint32Array;
  /** How many samples each reason of SELECTION_REASONS left out. */
  rejectedCounts: Int32Array;
  /** Reason codes in the order first met, so reasons are listed as a sample-by-sample count would list them. */
  reasonsMet: number[];
}

/** First index in times[0..count) whose time is >= timeMs (times ascending). */
export function lowerBoundTime(times: Float64Array, count: number, timeMs: number): number {
  let low = 0;
  let high = count;
  while (low < high) {
    const middle = (low + high) >>> 1;
    if ((times[middle] ?? Number.POSITIVE_INFINITY) < timeMs) low = middle + 1;
    else high = middle;
  }
  return low;
}

/** Whether the time falls in one of the windows (from inclusive, to exclusive). A plain loop: this runs per sample. */
function insideAny(windows: readonly ExcludedWindow[], timeMs: number): boolean {
  for (const window of windows) if (timeMs >= window.fromMs && timeMs < window.toMs) return true;
  return false;
}

/**
 * The accepted samples of one run for the query: time range first (binary search on the sorted times), then the
 * exclusion windows, then filterReason with the query's settings. Every sample left out is counted under its reason.
 */
export function selectRun<Columns extends StoredSampleColumns>(run: SampleRun<Columns>, query: SampleQuery): RunSelection<Columns> {
  const { columns, exclusions } = run;
  const start = query.fromMs === null ? 0 : lowerBoundTime(columns.timeMs, columns.count, query.fromMs);
  const end = Math.max(start, query.toMs === null ? columns.count : lowerBoundTime(columns.timeMs, columns.count, query.toMs));
  const accepted = new Uint32Array(end - start);
  const rejectedCounts = new Int32Array(SELECTION_REASONS.length);
  const reasonsMet: number[] = [];
  // One probe object reused for every sample: filterReason only reads these fields.
  const probe: { zenithDeg: number; sunAltDeg: number | null; flux: number | null; anisotropic?: boolean } = { zenithDeg: 0, sunAltDeg: null, flux: null };
  const anisotropic = columns.anisotropic;
  let acceptedCount = 0;
  for (let index = start; index < end; index += 1) {
    let reasonCode = NO_REJECTION;
    if (insideAny(exclusions, columns.timeMs[index] ?? 0)) reasonCode = 0;
    else {
      const sunAltDeg = columns.sunAltDeg[index] ?? Number.NaN;
      const flux = columns.flux[index] ?? Number.NaN;
      probe.zenithDeg = columns.zenithDeg[index] ?? Number.NaN;
      probe.sunAltDeg = Number.isNaN(sunAltDeg) ? null : sunAltDeg;
      probe.flux = Number.isNaN(flux) ? null : flux;
      if (anisotropic !== undefined) probe.anisotropic = anisotropic[index] === 1;
      const reason = filterReason(probe, query.filters);
      if (reason !== null) reasonCode = SELECTION_REASONS.indexOf(reason);
    }
    if (reasonCode === NO_REJECTION) {
      accepted[acceptedCount] = index;
      acceptedCount += 1;
    } else {
      const before = rejectedCounts[reasonCode] ?? 0;
      if (before === 0) reasonsMet.push(reasonCode);
      rejectedCounts[reasonCode] = before + 1;
    }
  }
  return { columns, stored: end - start, accepted: accepted.subarray(0, acceptedCount), rejectedCounts, reasonsMet };
}

/** selectRun for each run, with the stored count and the reasons summed over the runs (in the order first met). */
export function selectRuns<Columns extends StoredSampleColumns>(
  runs: readonly SampleRun<Columns>[],
  query: SampleQuery,
): { selections: RunSelection<Columns>[]; stored: number; rejectedByReason: Partial<Record<SelectionReason, number>> } {
  const selections = runs.map((run) => selectRun(run, query));
  const rejectedByReason: Partial<Record<SelectionReason, number>> = {};
  let stored = 0;
  for (const selection of selections) {
    stored += selection.stored;
    for (const code of selection.reasonsMet) {
      const reason = SELECTION_REASONS[code] ?? 'excluded_window';
      rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + (selection.rejectedCounts[code] ?? 0);
    }
  }
  return { selections, stored, rejectedByReason };
}

/** The accepted samples of several runs, ready for summarizeSeeingPresorted. */
export interface SelectedSamples {
  /** Run after run, each in time order. */
  timeMs: Float64Array;
  seeingArcsec: Float64Array;
  /** τ0 and θ0 (zenith, 500 nm) beside them, NaN where not logged; absent when no run has the column. */
  tau0Ms?: Float64Array;
  theta0Arcsec?: Float64Array;
  /** Exactly the sort sortPositive(seeingArcsec) would give, assembled from the runs' kept sorts. */
  presorted: SortedSeeing;
  /** Stored samples in the time range. */
  stored: number;
  rejectedByReason: Partial<Record<SelectionReason, number>>;
}

/**
 * The accepted samples as the engine's columns (time and seeing; run after run, each in time order), with the
 * counts of the rest, and their seeing sort taken from each run's kept sort instead of sorting again: walking a
 * run's sorted order and keeping the accepted samples gives them sorted, equal values still in index order;
 * several runs are merged, equal values going to the earlier run, which is where they sit in the concatenated
 * columns. So `presorted` is exactly what sortPositive of the selected seeing would give (it is stable).
 * Example: one run [0.9, 0.5, 0.7] with nothing left out → seeingArcsec [0.9, 0.5, 0.7], presorted.order [1, 2, 0].
 */
export function selectSamples(runs: readonly SortedSampleRun[], query: SampleQuery): SelectedSamples {
  const { selections, stored, rejectedByReason } = selectRuns(runs, query);
  let acceptedCount = 0;
  for (const selection of selections) acceptedCount += selection.accepted.length;
  const timeMs = new Float64Array(acceptedCount);
  const seeingArcsec = new Float64Array(acceptedCount);
  const tau0Ms = runs.some((run) => run.columns.tau0Ms !== undefined) ? new Float64Array(acceptedCount).fill(Number.NaN) : undefined;
  const theta0Arcsec = runs.some((run) => run.columns.theta0Arcsec !== undefined) ? new Float64Array(acceptedCount).fill(Number.NaN) : undefined;
  const sortedRuns: SortedSeeing[] = [];
  let firstPosition = 0;
  selections.forEach((selection, slot) => {
    copySelected(selection, firstPosition, timeMs, seeingArcsec);
    if (tau0Ms !== undefined && selection.columns.tau0Ms !== undefined) copyColumn(selection, firstPosition, selection.columns.tau0Ms, tau0Ms);
    if (theta0Arcsec !== undefined && selection.columns.theta0Arcsec !== undefined) copyColumn(selection, firstPosition, selection.columns.theta0Arcsec, theta0Arcsec);
    const run = runs[slot];
    if (run) sortedRuns.push(sortedSelection(run.seeingSort, selection, firstPosition));
    firstPosition += selection.accepted.length;
  });
  return {
    timeMs,
    seeingArcsec,
    ...(tau0Ms === undefined ? {} : { tau0Ms }),
    ...(theta0Arcsec === undefined ? {} : { theta0Arcsec }),
    presorted: mergeSortedRuns(sortedRuns, acceptedCount),
    stored,
    rejectedByReason,
  };
}

function copyColumn(selection: RunSelection, firstPosition: number, from: Float64Array, to: Float64Array): void {
  const { accepted } = selection;
  for (let slot = 0; slot < accepted.length; slot += 1) to[firstPosition + slot] = from[accepted[slot] ?? 0] ?? Number.NaN;
}

function copySelected(selection: RunSelection, firstPosition: number, timeMs: Float64Array, seeingArcsec: Float64Array): void {
  const { columns, accepted } = selection;
  for (let slot = 0; slot < accepted.length; slot += 1) {
    const index = accepted[slot] ?? 0;
    timeMs[firstPosition + slot] = columns.timeMs[index] ?? 0;
    seeingArcsec[firstPosition + slot] = columns.seeingArcsec[index] ?? Number.NaN;
  }
}

/** The run's accepted samples in seeing order, as positions in the concatenated columns. */
function sortedSelection(runSort: SortedSeeing, selection: RunSelection, firstPosition: number): SortedSeeing {
  const { accepted, columns } = selection;
  const positionOf = new Int32Array(columns.count).fill(-1);
  for (let slot = 0; slot < accepted.length; slot += 1) positionOf[accepted[slot] ?? 0] = firstPosition + slot;
  const order = new Uint32Array(accepted.length);
  const sorted = new Float64Array(accepted.length);
  let kept = 0;
  for (let rank = 0; rank < runSort.order.length; rank += 1) {
    const position = positionOf[runSort.order[rank] ?? 0] ?? -1;
    if (position >= 0) {
      order[kept] = position;
      sorted[kept] = runSort.sorted[rank] ?? Number.NaN;
      kept += 1;
    }
  }
  return { order, sorted };
}

/** Merges sorted runs (run r before run r + 1 in the columns) into one stable sort. */
function mergeSortedRuns(runs: readonly SortedSeeing[], total: number): SortedSeeing {
  const [onlyRun] = runs;
  if (runs.length === 1 && onlyRun) return onlyRun;
  const order = new Uint32Array(total);
  const sorted = new Float64Array(total);
  const heads = new Int32Array(runs.length);
  for (let position = 0; position < total; position += 1) {
    // The few runs are scanned for the smallest head; strict < keeps ties with the earliest run.
    let best = -1;
    let bestValue = Number.POSITIVE_INFINITY;
    runs.forEach((run, slot) => {
      const head = heads[slot] ?? 0;
      if (head < run.sorted.length && (best === -1 || (run.sorted[head] ?? Number.POSITIVE_INFINITY) < bestValue)) {
        best = slot;
        bestValue = run.sorted[head] ?? Number.POSITIVE_INFINITY;
      }
    });
    const run = runs[best];
    const head = heads[best] ?? 0;
    order[position] = run?.order[head] ?? 0;
    sorted[position] = bestValue;
    heads[best] = head + 1;
  }
  return { order, sorted };
}

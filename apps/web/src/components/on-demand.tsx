import { lazy, Suspense, type ComponentProps, type ComponentType } from "react";
import type { SiteMap } from "./site-map";

// The map (Leaflet) and the charts (recharts) are the two large libraries of the app: their code is loaded when a
// page first shows them, so signing in and opening the sites list do not wait for it. While it loads, a box of the
// same size says what is coming. Pages that will show them start the loading beside their own code (router.tsx).

export const loadSeeingCharts = () => import("./seeing-charts");
export const loadSiteMap = () => import("./site-map");
export const loadCompareCharts = () => import("./compare/compare-charts");

/** The stand-in for a part of the page whose code is still loading: its size, and in words what is coming. */
export function LoadingPart({ what, className }: { what: string; className: string }) {
  return (
    <div role="status" className={`flex items-center justify-center rounded-lg border border-line bg-panel px-4 text-center text-ink-soft ${className}`}>
      Loading {what}…
    </div>
  );
}

/** A component whose code is fetched on first use, shown meanwhile as a box of `placeClass` naming `what`. */
function onDemand<Props extends object>(load: () => Promise<ComponentType<Props>>, what: string, placeClass: string) {
  const Code = lazy(async () => ({ default: await load() }));
  return function OnDemand(props: Props) {
    return (
      <Suspense fallback={<LoadingPart what={what} className={placeClass} />}>
        <Code {...props} />
      </Suspense>
    );
  };
}

/** The size of one ChartFrame, so the page does not jump when the chart arrives. */
const CHART_PLACE = "h-[22rem] w-full";

export const OnDemandSeeingCharts = onDemand(
  async () => (await loadSeeingCharts()).SeeingCharts,
  "the charts (distribution, months, hours of night, one night, the two axes)",
  "h-[40rem] w-full",
);
export const OnDemandOverlaidCdfChart = onDemand(async () => (await loadCompareCharts()).OverlaidCdfChart, "the chart of the share of time at or below each seeing value", CHART_PLACE);
export const OnDemandMonthlyMediansChart = onDemand(async () => (await loadCompareCharts()).MonthlyMediansChart, "the chart of monthly medians", CHART_PLACE);
export const OnDemandDifferenceHistogram = onDemand(async () => (await loadCompareCharts()).DifferenceHistogram, "the chart of night-by-night differences", CHART_PLACE);

const SiteMapCode = lazy(async () => ({ default: (await loadSiteMap()).SiteMap }));

/** The site map, its code loaded on first use; the stand-in takes the map's own size. */
export function OnDemandSiteMap(props: ComponentProps<typeof SiteMap>) {
  return (
    <Suspense fallback={<LoadingPart what="the map" className={props.className ?? "h-[420px] w-full md:h-[520px]"} />}>
      <SiteMapCode {...props} />
    </Suspense>
  );
}

const nextFrame = () => new Promise<void>((resolve) => requestAnimationFrame(() => resolve()));

/**
 * Opens the browser's print dialogue once every on-demand part has replaced its stand-in (the page's route has
 * already fetched the charts' code), so a page printed at once does not carry "Loading …" boxes instead of charts
 * (gives up waiting after 5 s).
 */
export async function printWithCharts() {
  const startMs = performance.now();
  const stillLoading = () => Array.from(document.querySelectorAll('[role="status"]')).some((element) => element.textContent?.startsWith("Loading ") ?? false);
  while (stillLoading() && performance.now() - startMs < 5_000) await nextFrame();
  await nextFrame();
  window.print();
}

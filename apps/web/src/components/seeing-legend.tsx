import { useMemo } from "react";
import { SEEING_LEGEND_TICKS_ARCSEC, SEEING_SCALE_MAX_ARCSEC, SEEING_SCALE_MIN_ARCSEC, seeingColour } from "../lib/colour-scale";

// The map's key and settings, apart from the map itself: the map's code (Leaflet) loads on demand, these do not.

export interface MapTiles {
  url: string;
  attribution: string;
}

/** The colour key of the map: the ramp with ticks in arcsec, and the hollow marker for sites without data. */
export function SeeingLegend() {
  const gradient = useMemo(() => {
    const steps = 12;
    const colours = Array.from({ length: steps + 1 }, (_, index) =>
      seeingColour(SEEING_SCALE_MIN_ARCSEC + ((SEEING_SCALE_MAX_ARCSEC - SEEING_SCALE_MIN_ARCSEC) * index) / steps),
    );
    return `linear-gradient(to right, ${colours.join(", ")})`;
  }, []);
  return (
    <figure className="flex flex-wrap items-end gap-x-8 gap-y-3 px-3 text-sm" aria-label="Map colour key">
      <div>
        <figcaption className="mb-1 font-semibold">Median seeing at zenith, 500 nm (arcsec)</figcaption>
        <div className="h-3 w-64 rounded-sm border border-ink/30" style={{ background: gradient }} />
        <div className="relative h-5 w-64 text-xs text-ink-soft">
          {SEEING_LEGEND_TICKS_ARCSEC.map((tick) => (
            <span
              key={tick}
              className="num absolute -translate-x-1/2"
              style={{ left: `${((tick - SEEING_SCALE_MIN_ARCSEC) / (SEEING_SCALE_MAX_ARCSEC - SEEING_SCALE_MIN_ARCSEC)) * 100}%` }}
            >
              {tick.toFixed(1)}
            </span>
          ))}
        </div>
        <p className="text-xs text-ink-soft">Dark blue: sharper images (better). Yellow: more blurred.</p>
      </div>
      <div className="flex items-center gap-2">
        <svg width="24" height="24" aria-hidden="true">
          <circle cx="12" cy="12" r="9" fill="none" stroke="#1c2733" strokeWidth="2.5" strokeDasharray="4 3" />
        </svg>
        <span>No seeing data yet</span>
      </div>
    </figure>
  );
}

import { useEffect, useMemo, useState } from "react";
import "leaflet/dist/leaflet.css";
import { CircleMarker, GeoJSON, MapContainer, ScaleControl, TileLayer, Tooltip, useMap } from "react-leaflet";
import { latLngBounds, type CircleMarker as LeafletCircleMarker } from "leaflet";
import type { SiteListItem } from "@calmcrest/contracts";
import { countryOutlines } from "../lib/basemap";
import { seeingColour } from "../lib/colour-scale";
import { formatArcsec, formatNumber } from "../lib/format";
import type { MapTiles } from "./seeing-legend";


function FitToSites({ sites }: { sites: SiteListItem[] }) {
  const map = useMap();
  useEffect(() => {
    if (sites.length === 0) return;
    const bounds = latLngBounds(sites.map((site) => [site.latitude, site.longitude] as [number, number]));
    // Candidate sites are often a few kilometres apart: cap the zoom so coastlines and borders give context.
    map.fitBounds(bounds.pad(0.3), { maxZoom: 9 });
  }, [map, sites]);
  return null;
}

/**
 * The candidate sites on a map. Offline by default (country outlines shipped with the app); with `tiles` it shows an
 * online tile layer instead. Marker fill follows median seeing; a hollow dashed ring means no data yet.
 */
export function SiteMap({
  sites,
  tiles,
  highlightedSiteId,
  onHover,
  onOpen,
  labelled = false,
  className = "h-[420px] w-full rounded-lg border border-line md:h-[520px]",
}: {
  sites: SiteListItem[];
  tiles?: MapTiles | null;
  highlightedSiteId?: number | null;
  onHover?: (siteId: number | null) => void;
  onOpen: (siteId: number) => void;
  /** Show every marker's label (name and median) all the time, not only on hover or focus. */
  labelled?: boolean;
  className?: string;
}) {
  const outlines = useMemo(() => (tiles ? null : countryOutlines()), [tiles]);
  return (
    <MapContainer
      center={[0, 0]}
      zoom={2}
      minZoom={2}
      maxZoom={tiles ? 14 : 10}
      worldCopyJump={false}
      className={className}
      style={{ background: "#dbe6ea" }}
      attributionControl={Boolean(tiles)}
    >
      {tiles ? (
        <TileLayer url={tiles.url} attribution={tiles.attribution} />
      ) : outlines ? (
        <GeoJSON data={outlines} interactive={false} style={{ color: "#8a9a9f", weight: 1, fillColor: "#f3f1e8", fillOpacity: 1 }} />
      ) : null}
      <FitToSites sites={sites} />
      <ScaleControl position="bottomright" imperial={false} />
      {sites.map((site) => (
        <SiteMarker key={site.id} site={site} highlighted={highlightedSiteId === site.id} onHover={onHover} onOpen={onOpen} labelled={labelled} />
      ))}
    </MapContainer>
  );
}

/** What a screen reader says for a marker: the same facts as its tooltip, in one line. */
export function markerLabel(site: SiteListItem): string {
  return site.summary
    ? `${site.name}, median ${formatArcsec(site.summary.median)}, ${formatNumber(site.summary.nights)} nights`
    : `${site.name}, no data yet`;
}

/**
 * One site on the map. Leaflet draws it as an SVG path with no keyboard access, so once the path exists it is made a
 * focusable link: Tab reaches it, focus shows the hover tooltip (and highlights its table row), Enter or Space opens it.
 */
function SiteMarker({
  site,
  highlighted,
  onHover,
  onOpen,
  labelled,
}: {
  site: SiteListItem;
  highlighted: boolean;
  onHover?: (siteId: number | null) => void;
  onOpen: (siteId: number) => void;
  labelled: boolean;
}) {
  const [layer, setLayer] = useState<LeafletCircleMarker | null>(null);
  const median = site.summary?.median;
  const label = markerLabel(site);

  useEffect(() => {
    const element = layer?.getElement();
    if (!layer || !element) return;
    element.setAttribute("tabindex", "0");
    element.setAttribute("role", "link");
    element.setAttribute("aria-label", label);
    const onKeyDown = (event: Event) => {
      if (!(event instanceof KeyboardEvent) || (event.key !== "Enter" && event.key !== " ")) return;
      // Space would otherwise scroll the page, as it does for any link-like control.
      event.preventDefault();
      onOpen(site.id);
    };
    const onFocus = () => {
      layer.openTooltip();
      onHover?.(site.id);
    };
    const onBlur = () => {
      if (!labelled) layer.closeTooltip();
      onHover?.(null);
    };
    element.addEventListener("keydown", onKeyDown);
    element.addEventListener("focus", onFocus);
    element.addEventListener("blur", onBlur);
    return () => {
      element.removeEventListener("keydown", onKeyDown);
      element.removeEventListener("focus", onFocus);
      element.removeEventListener("blur", onBlur);
    };
  }, [layer, label, labelled, site.id, onHover, onOpen]);

  return (
    <CircleMarker
      center={[site.latitude, site.longitude]}
      radius={highlighted ? 14 : 11}
      // Leaflet reads the class only when the path is created, so it is a prop here rather than a path option.
      className={median === undefined ? "site-marker site-marker-empty" : "site-marker"}
      pathOptions={
        median === undefined
          ? { color: "#1c2733", weight: 2.5, dashArray: "4 3", fill: true, fillColor: "#ffffff", fillOpacity: 0.0 }
          : { color: "#1c2733", weight: highlighted ? 3 : 1.5, fillColor: seeingColour(median), fillOpacity: 1 }
      }
      eventHandlers={{
        // The SVG path exists only once the layer is on the map; "add" is the first moment it can be given keyboard access.
        add: (event) => setLayer(event.target as LeafletCircleMarker),
        remove: () => setLayer(null),
        click: () => onOpen(site.id),
        mouseover: () => onHover?.(site.id),
        mouseout: () => onHover?.(null),
      }}
    >
      {labelled ? (
        <Tooltip direction="top" offset={[0, -10]} permanent>
          <span className="block font-semibold">{site.name}</span>
          <span className="block">{site.summary ? `median ${formatArcsec(site.summary.median)}` : "no samples in the window"}</span>
        </Tooltip>
      ) : (
      <Tooltip direction="top" offset={[0, -10]}>
        <span className="block font-semibold">{site.name}</span>
        <span className="block">{formatNumber(site.elevationM)} m above sea level</span>
        {site.summary ? (
          <span className="block">
            median {formatArcsec(site.summary.median)} · {formatNumber(site.summary.nights)} nights
          </span>
        ) : (
          <span className="block">no seeing data yet</span>
        )}
      </Tooltip>
      )}
    </CircleMarker>
  );
}

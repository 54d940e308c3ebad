import { feature } from "topojson-client";
import type { Feature, FeatureCollection, Geometry, MultiPolygon, Polygon, Position } from "geojson";
import type { GeometryCollection, Topology } from "topojson-specification";
import countries110m from "world-atlas/countries-110m.json";

/** Natural Earth's Antarctica (ISO 3166 numeric 010): its ring spans every longitude and smears across a flat map. */
const ANTARCTICA_ID = "010";

/**
 * A ring that crosses the antimeridian (Russia's far east, Fiji) jumps from +180 to -180 and draws a line across
 * the whole flat map. Moving its western longitudes by +360 keeps it in one piece (it then runs past 180°E, which
 * Leaflet's plain CRS draws without trouble).
 */
export function unwrapRing(ring: Position[]): Position[] {
  const longitudes = ring.map((position) => position[0] ?? 0);
  const spanDeg = Math.max(...longitudes) - Math.min(...longitudes);
  if (spanDeg <= 180) return ring;
  return ring.map(([longitude = 0, latitude = 0]) => [longitude < 0 ? longitude + 360 : longitude, latitude]);
}

function unwrapGeometry(geometry: Geometry): Geometry {
  if (geometry.type === "Polygon") return { ...geometry, coordinates: geometry.coordinates.map(unwrapRing) } satisfies Polygon;
  if (geometry.type === "MultiPolygon") return { ...geometry, coordinates: geometry.coordinates.map((polygon) => polygon.map(unwrapRing)) } satisfies MultiPolygon;
  return geometry;
}

let cached: FeatureCollection | null = null;

/** Country outlines shipped with the app (Natural Earth 1:110m via world-atlas), ready for a Leaflet GeoJSON layer. */
export function countryOutlines(): FeatureCollection {
  if (cached) return cached;
  const topology = countries110m as unknown as Topology<{ countries: GeometryCollection }>;
  const collection = feature(topology, topology.objects.countries);
  const features: Feature[] = collection.features
    .filter((country) => String(country.id) !== ANTARCTICA_ID)
    .map((country) => ({ ...country, geometry: unwrapGeometry(country.geometry) }));
  cached = { type: "FeatureCollection", features };
  return cached;
}

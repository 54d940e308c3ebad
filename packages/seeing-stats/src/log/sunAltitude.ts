import { Body, Equator, Observer, SiderealTime } from 'astronomy-engine';
import { requireRange } from '../errors.js';
import { DEG_TO_RAD } from '../physics/constants.js';
import { normalizeLongitudeDeg } from '../summary/nightLabel.js';

export interface SiteLocation {
  latitudeDeg: number;
  /** East positive. */
  longitudeDeg: number;
  elevationM?: number;
}

const NODE_SPACING_MS = 3 * 3_600_000;
/** Sidereal hours per UT millisecond: 1.00273790935 sidereal days per solar day (IAU 1982 GMST rate). */
const SIDEREAL_HOURS_PER_MS = (24 * 1.00273790935) / 86_400_000;

interface SunNode {
  raHours: number;
  decDeg: number;
  siderealHours: number;
}

/**
 * A fast geometric sun altitude (degrees, no refraction) for one site. The sun's topocentric right ascension
 * and declination of date and the Greenwich apparent sidereal time come from astronomy-engine (VSOP87-based,
 * Don Cross) on a 3-hour grid; between grid points RA and Dec are interpolated linearly (they move about 1° a
 * day) and sidereal time advances at its constant rate, then sin h = sin φ sin δ + cos φ cos δ cos H.
 * About 0.1 µs a call instead of ~30 µs for astronomy-engine's full chain; error well under 0.01°.
 */
/** Grid nodes of the sites used last (most recent last): one site's reader and its checks share the same nodes. */
const recentNodes: { key: string; nodes: Map<number, SunNode> }[] = [];
const SITES_REMEMBERED = 4;

/**
 * The node table of a site (latitude, longitude, elevation as text), shared by every createSunAltitude for that site
 * while it is among the last SITES_REMEMBERED used: a node depends on nothing else, so a second function for the
 * same site (the row reader's fast path, the longitude-sign check) reuses the nodes the first one computed.
 */
function sharedNodes(key: string): Map<number, SunNode> {
  const found = recentNodes.findIndex((entry) => entry.key === key);
  const entry = found >= 0 ? recentNodes.splice(found, 1)[0] : undefined;
  const nodes = entry?.nodes ?? new Map<number, SunNode>();
  recentNodes.push({ key, nodes });
  if (recentNodes.length > SITES_REMEMBERED) recentNodes.shift();
  return nodes;
}

export function createSunAltitude(site: SiteLocation): (timeMs: number) => number {
  requireRange(site.latitudeDeg, 'latitudeDeg', -90, 90, 'degrees', true);
  const longitudeDeg = normalizeLongitudeDeg(site.longitudeDeg);
  const observer = new Observer(site.latitudeDeg, longitudeDeg, site.elevationM ?? 0);
  const sinLatitude = Math.sin(site.latitudeDeg * DEG_TO_RAD);
  const cosLatitude = Math.cos(site.latitudeDeg * DEG_TO_RAD);
  const longitudeHours = longitudeDeg / 15;
  const nodes = sharedNodes(`${site.latitudeDeg} ${longitudeDeg} ${site.elevationM ?? 0}`);
  const nodeAt = (nodeIndex: number): SunNode => {
    let node = nodes.get(nodeIndex);
    if (node === undefined) {
      const date = new Date(nodeIndex * NODE_SPACING_MS);
      const position = Equator(Body.Sun, date, observer, true, true);
      node = { raHours: position.ra, decDeg: position.dec, siderealHours: SiderealTime(date) };
      if (nodes.size > 100_000) nodes.clear(); // bound memory on pathological spans of time
      nodes.set(nodeIndex, node);
    }
    return node;
  };
  let cachedIndex = Number.NaN;
  let cachedStart: SunNode = { raHours: 0, decDeg: 0, siderealHours: 0 };
  let cachedRaStepHours = 0;
  let cachedDecStepDeg = 0;
  return (timeMs: number): number => {
    const nodeIndex = Math.floor(timeMs / NODE_SPACING_MS);
    if (nodeIndex !== cachedIndex) {
      cachedStart = nodeAt(nodeIndex);
      const next = nodeAt(nodeIndex + 1);
      let raStep = next.raHours - cachedStart.raHours;
      if (raStep < -12) raStep += 24; // RA wraps at 24 h near the March equinox
      cachedRaStepHours = raStep;
      cachedDecStepDeg = next.decDeg - cachedStart.decDeg;
      cachedIndex = nodeIndex;
    }
    const elapsedMs = timeMs - nodeIndex * NODE_SPACING_MS;
    const share = elapsedMs / NODE_SPACING_MS;
    const raHours = cachedStart.raHours + share * cachedRaStepHours;
    const decRad = (cachedStart.decDeg + share * cachedDecStepDeg) * DEG_TO_RAD;
    const localSiderealHours = cachedStart.siderealHours + elapsedMs * SIDEREAL_HOURS_PER_MS + longitudeHours;
    const hourAngleRad = (localSiderealHours - raHours) * 15 * DEG_TO_RAD;
    const sinAltitude = sinLatitude * Math.sin(decRad) + cosLatitude * Math.cos(decRad) * Math.cos(hourAngleRad);
    return Math.asin(Math.max(-1, Math.min(1, sinAltitude))) / DEG_TO_RAD;
  };
}

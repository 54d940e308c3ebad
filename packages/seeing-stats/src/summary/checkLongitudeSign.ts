import { SeeingInputError } from '../errors.js';
import { createSunAltitude, type SiteLocation } from '../log/sunAltitude.js';
import { normalizeLongitudeDeg } from './nightLabel.js';

export interface LongitudeSignCheck {
  /** Sample times looked at (at most maxChecked, spread evenly over the input). */
  checked: number;
  /** Share of them with the sun above the limit at the given longitude. */
  rejectedShare: number;
  /** The same share with the longitude's sign flipped. */
  mirroredRejectedShare: number;
  /** True when the sun filter rejects a large share (≥ 20 %) that the mirrored longitude would mostly keep (less than half as many rejected). */
  suspicious: boolean;
}

/** Share of samples the sun filter rejects from which a wrong sign is suspected. */
const SUSPICIOUS_REJECTED_SHARE = 0.2;

/**
 * A wrong-sign longitude (west entered as east) moves the site's night by hours, so the sun filter throws away
 * real night data and keeps twilight. A monitor logs at night, so its samples should mostly pass the sun filter:
 * when at least 20 % of them are rejected and the mirrored longitude (−longitude) would reject less than half as
 * many, the sign is suspect ("check the sign of the longitude (east positive)"). Calmcrest's heuristic; the sun
 * altitude is createSunAltitude's. Give the times of the samples that reach the sun filter.
 * Throws SeeingInputError for a bad site or limit. Example: a night log at 70° W checked with +70° → suspicious: true.
 */
export function checkLongitudeSign(timesMs: ArrayLike<number>, site: SiteLocation, sunMaxDeg: number, maxChecked = 5000): LongitudeSignCheck {
  if (!Number.isFinite(sunMaxDeg)) throw new SeeingInputError(`sunMaxDeg must be a number of degrees, got ${String(sunMaxDeg)}`);
  const total = timesMs.length;
  const checked = Math.min(total, Math.max(1, Math.floor(maxChecked)));
  if (total === 0) return { checked: 0, rejectedShare: 0, mirroredRejectedShare: 0, suspicious: false };
  const given = createSunAltitude(site);
  const longitudeDeg = normalizeLongitudeDeg(site.longitudeDeg);
  // 180° mirrors onto itself (−180° is the same meridian), so no sign mistake can be seen there.
  const mirroredLongitude = longitudeDeg === 180 ? 180 : -longitudeDeg;
  const mirrored = createSunAltitude({ ...site, longitudeDeg: mirroredLongitude });
  let rejected = 0;
  let mirroredRejected = 0;
  for (let slot = 0; slot < checked; slot += 1) {
    const time = timesMs[Math.floor((slot * total) / checked)] ?? 0;
    if (given(time) > sunMaxDeg) rejected += 1;
    if (mirrored(time) > sunMaxDeg) mirroredRejected += 1;
  }
  const rejectedShare = rejected / checked;
  const mirroredRejectedShare = mirroredRejected / checked;
  const suspicious = mirroredLongitude !== longitudeDeg && rejectedShare >= SUSPICIOUS_REJECTED_SHARE && mirroredRejectedShare < rejectedShare / 2;
  return { checked, rejectedShare, mirroredRejectedShare, suspicious };
}

/** Arcseconds per radian (180 × 3600 / π). */
export const ARCSEC_PER_RADIAN = (180 * 3600) / Math.PI;

/** ε = 0.98 λ / r0: Tokovinin 2002, PASP 114, 1156, eq. 5. Recorded in every summary's metadata. */
export const SEEING_CONSTANT = 0.98;

/** The site-testing reference wavelength; every statistic is reported at zenith and this wavelength. */
export const REFERENCE_WAVELENGTH_NM = 500;

export const DEG_TO_RAD = Math.PI / 180;

/**
 * Physical constants the harness uses for its suites, demo, reports and screens (the kernels take mu as an input
 * and hold none of these). One home for each value; its source beside it.
 */

/** Earth's gravitational parameter GM, km^3/s^2: the WGS 84 value (NIMA TR8350.2, 3rd ed., 2000, table 3.1). */
export const GM_EARTH = 398600.4418;
/** The text of GM_EARTH with its source, for the notes of suites and reports. */
export const GM_EARTH_NOTE = `${GM_EARTH} km^3/s^2 (WGS 84, NIMA TR8350.2)`;
/** Earth's equatorial radius, km: the WGS 84 semi-major axis a = 6378137 m (NIMA TR8350.2, table 3.1). */
export const R_EARTH = 6378.137;

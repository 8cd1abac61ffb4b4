/**
 * The SDMX REST data query's selection rules, shared by our SDMX routes and the local fake source:
 * a key of dimension values ("Q.EST.GDP_VOL", "+" between alternatives, an empty position for any
 * value, "all" for everything) and a window of periods (`startPeriod`, `endPeriod`).
 */

/**
 * The series a data query's key selects: dimension values separated by ".", alternatives by "+",
 * an empty position for any value; "all" (or no key) for every series.
 */
export function selectByKey<T>(items: T[], keyOf: (t: T) => string[], key: string | undefined): T[] {
  if (!key || key === 'all' || key === '*') return items;
  const parts = key.split('.');
  return items.filter((item) => {
    const k = keyOf(item);
    if (parts.length !== k.length) return false;
    return parts.every((p, i) => p === '' || p === '*' || p.split('+').some((alt) => alt.toUpperCase() === k[i].toUpperCase()));
  });
}

/** Keeps the periods between `startPeriod` and `endPeriod` (SDMX periods; a year bounds every period in it). */
export function periodWindow(periods: string[], values: (number | null)[], startPeriod?: string, endPeriod?: string) {
  const keep = periods.map((p) => (!startPeriod || p >= startPeriod || p.startsWith(startPeriod)) && (!endPeriod || p <= endPeriod || p.startsWith(endPeriod)));
  return { periods: periods.filter((_, i) => keep[i]), values: values.filter((_, i) => keep[i]) };
}

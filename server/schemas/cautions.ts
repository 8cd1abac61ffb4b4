/**
 * The cautions of the design notes, in one place: shown under every decomposition (the study
 * page shows the `cautions` a result carries), printed on exhibits and written into downloads.
 * Exhibits freeze the line they were submitted with, so a change here reaches new snapshots only.
 */
export const CAUTIONS = [
  'Gap estimates near the end of a sample are unreliable and are revised as new data arrive.',
  'Two-sided filters use future data; the Hodrick–Prescott filter can produce cycles that are not in the data.',
  'Estimates are inputs to judgement, not a basis for policy or investment decisions on their own.',
] as const;

/** The one-line form, for exhibits, chart files and the "About" sheet of downloads. */
export const CAUTION_LINE = 'Caution: end-of-sample estimates are revised as data arrive; two-sided filters use future data; filters can create cycles that are not in the data. Estimates are inputs to judgement.';

/** Under every range of estimates across methods (studies, boards, exhibits, downloads). */
export const RANGE_CAUTION = 'The range shows how far the methods’ estimates disagree: it is not a forecast and not a confidence interval.';

/** Under every revision band. */
export const REVISION_BAND_CAUTION = 'The revision band shows how far earlier end-of-sample estimates were revised at each distance from the end: a record of past revisions, not a forecast.';

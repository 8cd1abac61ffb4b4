/**
 * Chart options in Tidegauge's visual language: the one home is server/schemas/charts (shared with
 * the server, which draws the same figures into PDFs); the screen imports them from here.
 */
export * from '@schemas/charts/options';
export { axisFmt } from '@schemas/charts/palette';
export { endOfSampleBand, timeAxis, yearTicks } from '@schemas/charts/axes';
export { exhibitChart, exhibitFigure, figureText } from '@schemas/charts/figure';
export { rangeChart, revisionBandChart } from '@schemas/charts/range';

// A division dial's chart: the public surface of the cavity-model and monotone fits.
export * from './types';
export { modelFrequencyHz } from './cavity-model';
export { chartTable, fitDialChart, modelDivisions, type ChartTableRow } from './fit';

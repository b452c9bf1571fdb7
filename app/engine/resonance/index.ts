// Resonance fitting of a swept trace: the public surface of the candidate search, the scalar
// Lorentzian dip, the complex Q-circle and the model choice.
export * from './trace';
export { fitScalarDip, scalarProblem } from './scalar-dip';
export { fitComplexDip } from './complex-circle';
export { fitResonances, requireTrustworthy } from './fit';
export { CHI_SQUARE_LIMIT } from './judge';

/**
 * Derived figures of S-parameters: per-entry figures (dB, return/insertion loss, VSWR, phase, group
 * delay, input impedance), two-port stability and gain (K, |Δ|, μ, μ', MAG/MSG), N-port passivity and
 * reciprocity, and the registry of named figures (`db(S21)`, `rl(1)`, `k`, …).
 *
 * @module
 */
export {
  groupDelay,
  inputImpedance,
  inputReactance,
  inputResistance,
  insertionLoss,
  loadReflection,
  loadedReflection,
  magnitudeDb,
  magnitudeToDb,
  phaseDeg,
  returnLoss,
  returnLossFromMagnitude,
  unwrappedPhaseDeg,
  vswr,
  vswrFromMagnitude,
  wrapDegrees,
} from './entry.js';
export {
  GAIN_AVAILABLE,
  GAIN_STABLE,
  deltaMagnitude,
  maxGain,
  maxGainDb,
  maxUnilateralGain,
  muFactor,
  muPrimeFactor,
  rollettK,
} from './twoport.js';
export { passivityMargin, reciprocityError } from './nport.js';
export {
  FIGURES,
  FigureError,
  computeFigure,
  figureSpec,
  parseFigure,
  type FigureArguments,
  type FigureErrorCode,
  type FigureFunction,
  type FigureSpec,
  type ParseFigureOptions,
  type ParsedFigure,
} from './registry.js';

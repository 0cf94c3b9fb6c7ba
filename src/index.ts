/**
 * scatterbox library API: netlist → circuit → S-parameters → files.
 *
 * ```ts
 * import { loadNetlistFile, solve, writeNetwork } from 'scatterbox';
 * const { circuit } = loadNetlistFile('circuits/harmonic-lowpass-433.sbx', { set: ['fc=600 MHz'] });
 * const s = solve(circuit);                      // NetworkData with S over the sweep
 * writeNetwork(s, 'lowpass.s2p', { data: 'DB' }); // atomic write
 * ```
 */
export type { NetlistAst, Statement, Expr, Arg, RangeClause } from './ast/ast.js';
export { parse, loadNetlist, loadNetlistFile, type LoadOptions, type LoadResult } from './load.js';
export {
  DiagnosticBag,
  InputError,
  formatDiagnostic,
  formatDiagnostics,
  type Diagnostic,
  type SourceSpan,
  type Severity,
} from './diagnostics/diagnostic.js';
export { elaborate, type ElaborateOptions, type Override } from './elaborate/elaborate.js';
export type { Circuit, Port, ParameterValue, Variable } from './elaborate/circuit.js';
export { SERIES_NAMES, isSeriesName, seriesTable, nearestInSeries, seriesValuesIn, type SeriesName } from './design/series.js';
export { ELEMENTS } from './elements/registry.js';
export type { ElementType, ElementInstance, PropertySpec, TerminalSpec, StampBuilder, Stamper } from './elements/types.js';
export { buildPlan, lowestOf, stampAt, type PlanOptions, type StampPlan } from './plan/plan.js';
export { solveSweep, solveSweep as solve, SweepRunner, SingularSystemError, NonFiniteResultError, type SweepOptions, type SolveMethod } from './solve/sweep.js';
export type { NetworkData, ParameterKind, NoiseParameters } from './network/types.js';
export { entryIndex } from './network/types.js';
export { convertNetwork, renormalizeNetwork, ConversionError } from './network/convert.js';
export {
  formatTouchstone,
  parseTouchstone,
  touchstoneExtension,
  TouchstoneError,
  type TouchstoneVersion,
  type ComplexFormat,
  type FrequencyUnit,
  type TouchstoneWriteOptions,
  type TouchstoneReadOptions,
} from './io/touchstone.js';
export { formatCsv, csvField, csvRow, type CsvWriteOptions } from './io/csv.js';
export { formatJson, parseJson, JsonNetworkError } from './io/json.js';
export { writeFileAtomic, writeFileAtomicSync, sweepTempFiles } from './io/atomic.js';
export { checkOutputs, checkOutputTarget, ensureFolder, checkDistinctOutputs, checkBatchNames, explainWriteError, resolveWriteTarget, WriteError, type WriteTarget } from './io/guard.js';
export { renderNetwork, renderNetworkChunks, writeNetwork, formatFromPath, OutputError, type OutputFormat, type OutputOptions } from './io/output.js';
export { formatTable, tableChunks, formatFigureTable, figureTableChunks } from './io/table.js';
export {
  toTwoPort,
  fromTwoPort,
  toChain,
  fromChain,
  toTransfer,
  fromTransfer,
  toHybrid,
  fromHybrid,
  cascade,
  TwoPortConversionError,
  FrequencyGridError,
  type TwoPortData,
  type ChainData,
  type TransferData,
  type HybridData,
  type TwoPortRepresentation,
} from './network/algebra.js';
export { mixedMode, singleEnded, modeLabels, isMixedMode, modeEntryName, type MixedModeData, type PortPair } from './network/mixed-mode.js';
export { renormalizeComplex, fromComplexReferences } from './network/power-waves.js';
export * from './figures/index.js';
export { evaluateSpecs, limitAt } from './check/evaluate.js';
export type { SpecDefinition, SpecResult } from './check/types.js';
export { compareNetworks, CompareError, type Comparison, type Tolerance, type EntryDeviation } from './check/compare.js';
export { formatJunit, specSuite, comparisonSuite, type JunitSuite } from './check/junit.js';
export { formatSpecTable, formatComparisonTable, checkReportJson } from './check/report.js';
export { readNetworkFile, loadNetworkFile, type LoadedNetworkFile } from './io/read.js';
export { readInputText, InputFileError } from './io/source-file.js';
export { convertData, type ConvertOptions, type ConvertTarget } from './io/convert-file.js';
export { evaluateQuantity } from './load.js';
export { microstripStatic, microstripDispersive, microstripWidth, microstripAt } from './models/microstrip.js';
export { renderReport, renderPlotSvg, prepareOverlay, type ReportInput, type OverlayReportInput, type PlotSvgOptions, type Dataset, type Overlay, type OverlayPart } from './report/index.js';
export { solveSweepParallel, closeSweepPool, type ParallelOptions } from './solve/parallel.js';
export { DesignModel, VariableError, setText, type DesignOptions, type ModelRecipe, type MarginGradient, type NetworkDerivatives } from './design/model.js';
export { rankSensitivities, formatSensitivities, type SpecSensitivity, type VariableEffect } from './design/rank.js';
export { marginDerivatives, figureAlong, specPoints } from './design/model.js';
export { stampDifferences, sweepDerivatives, stepFor, type StampDifferences } from './design/sensitivity.js';
export { ParameterGraph, ElementValueError } from './params/graph.js';
export { compileExpr, type Compiled, type CompileScope } from './params/compile.js';
export { restampElements, captureElement, addCaptured, PatternChangedError, type CapturedStamp } from './plan/plan.js';
export type { ValueBinding, Unfollowed } from './elaborate/circuit.js';
export { parseOver, spacedValues, familyMembers, evaluateFamily, formatValue, FamilyMemberError, type OverAxis, type OverSpacing, type FamilyMember, type FamilyModel, type MemberResult } from './design/family.js';
export { formatFamilyJson, familyCsvChunks, formatFamilyCsv, familyColumn, FAMILY_SCHEMA_ID, type FamilyVariable, type FamilyResult } from './io/family.js';
export { fit, parseMargins, specScale, penaltyOf, mulberry32, toUnit, fromUnit, isLogScale, neighbours, HINGE, EXHAUSTIVE_SNAP, type FitOptions, type FitResult, type FitMethod, type FitProgress, type FitStop } from './design/fit.js';
export { editVariableValues, valueText, valueRange, netlistValue, WriteBackError } from './design/write-back.js';
export { runYield, evaluateSamples, summarizeYield, sampleSetShape, SampleEvaluator, sampleRows, sampleSetOf, envelopePercentiles, ENVELOPE_PERCENTILES, type YieldOptions, type YieldResult, type YieldSample, type YieldTolerance, type SampleSet, type SampleRows, type EnvelopeRows, type YieldEnvelope } from './yield/run.js';
export { evaluateSamplesParallel, type ParallelYieldOptions } from './yield/parallel.js';
export { renderYieldReport, yieldEnvelopeSvg, marginHistogramSvg, type YieldNominal } from './yield/html.js';
export { samplerPlan, sampleDraws, drawSample, type SamplerPlan, type SampleDraws } from './yield/sampler.js';
export { formatYield, yieldJson, yieldSuite, yieldCsv, marginHistogram, specDrivers, driverText, envelopeEntries, type SpecDriver } from './yield/report.js';
export { startLive, LiveSession, LiveRequestError, sliderOf, checkHeaders, makeToken, tokenMatches, type LiveOptions, type LiveServer, type LiveResult } from './live/index.js';
export { parseShard, shardRange, designDigest, formatPartial, parsePartial, mergePartials, encodeDoubles, decodeDoubles, PartialError, PARTIAL_SCHEMA, type PartialMeta } from './yield/partial.js';
export { uniformAt, normalAt, truncatedNormalAt, normalTruncation, fillUniform, fillNormal, philoxBlock } from './yield/random.js';
export { wilsonInterval, normalQuantile, normalCdf, percentile, histogram, pearson, type ProportionInterval } from './yield/stats.js';
export type { Tolerance as PartTolerance, ToleranceDistribution, Lot, RandomInput } from './elaborate/circuit.js';
export {
  designAnyFilter,
  designFilter,
  designEllipticFilter,
  designStubLowpass,
  designSteppedLowpass,
  designCoupledBandpass,
  designMatch,
  readFilterRequest,
  readMatchRequest,
  checkDesignText,
  prototype,
  prototypeGain,
  minimumOrder,
  binomialSections,
  chebyshevSections,
  DesignRequestError,
  type FilterRequest,
  type FilterDesign,
  type MatchRequest,
  type MatchDesign,
  type Prototype,
} from './synth/index.js';

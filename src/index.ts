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
export type { NetlistAst, Statement, Expr, Arg } from './ast/ast.js';
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
export type { Circuit, Port, ParameterValue } from './elaborate/circuit.js';
export { ELEMENTS } from './elements/registry.js';
export type { ElementType, ElementInstance, PropertySpec, TerminalSpec, StampBuilder, Stamper } from './elements/types.js';
export { buildPlan, type StampPlan } from './plan/plan.js';
export { solveSweep, solveSweep as solve, SingularSystemError, type SweepOptions } from './solve/sweep.js';
export type { NetworkData, ParameterKind } from './network/types.js';
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
export { formatCsv, type CsvWriteOptions } from './io/csv.js';
export { formatJson, parseJson } from './io/json.js';
export { writeFileAtomic, writeFileAtomicSync } from './io/atomic.js';
export { renderNetwork, writeNetwork, formatFromPath, OutputError, type OutputFormat, type OutputOptions } from './io/output.js';
export { formatTable } from './io/table.js';

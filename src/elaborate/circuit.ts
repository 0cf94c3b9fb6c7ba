import type { Diagnostic, SourceSpan } from '../diagnostics/diagnostic.js';
import type { ElementInstance } from '../elements/types.js';
import type { SpecDefinition } from '../check/types.js';

/** A port after elaboration: numbered from 1, between two nodes, with a real reference impedance. */
export interface Port {
  /** 1-based port number. */
  number: number;
  plus: number;
  minus: number;
  plusName: string;
  minusName: string;
  /** Reference impedance in ohms: its resistance (> 0)… */
  reference: number;
  /** …and its reactance, for a complex reference (power waves, Kurokawa 1965); 0 or absent for a real one. */
  reactance?: number;
  span: SourceSpan;
}

/** A parameter's final value, for summaries and reports. */
export interface ParameterValue {
  name: string;
  /** Value in SI units (or the plain number). */
  value: number;
  /** The SI unit text of `value` ('' for a plain number), e.g. 'ohm', 'F', 'Hz'. */
  unit: string;
  span: SourceSpan;
}

/** The elaborated circuit: plain numbers in SI units, nodes as indices (ground = -1). */
export interface Circuit {
  file: string;
  title?: string;
  /** Node names by index (ground excluded). */
  nodeNames: string[];
  elements: ElementInstance[];
  /** Ports sorted by number, numbered 1..N without gaps. */
  ports: Port[];
  /** Limits the circuit must meet (`spec` statements), checked by `scatterbox check`. */
  specs: SpecDefinition[];
  /** Nodes that serve as the reference of a group with ports but no path to ground. */
  localReferences: number[];
  /** Sweep frequencies in Hz, ascending, without duplicates. */
  frequencies: Float64Array;
  parameters: ParameterValue[];
  /** Warnings found while elaborating (errors throw instead). */
  warnings: Diagnostic[];
}

/**
 * The solving part of a circuit in a form that crosses to a worker thread cheaply. Copying a
 * circuit object by object (structured clone) costs in proportion to its objects — about 4 µs an
 * element each way, measured, and once for every worker — so the elements travel as a few typed
 * arrays and strings instead, and the worker rebuilds plain element objects from them.
 *
 * Element order is kept: the stamp plan hands out matrix slots in order of first use and sums each
 * slot's contributions in element order, so the same order gives the same bits in every thread.
 *
 * @module
 */
import type { Circuit } from '../elaborate/circuit.js';
import type { ElementInstance } from '../elements/types.js';

const NO_SPAN = { file: '', line: 1, column: 1, length: 1 };

export interface PackedCircuit {
  file: string;
  title?: string;
  nodeNames: string[];
  localReferences: number[];
  ports: Circuit['ports'];
  /** Distinct element types, and per element the index of its type. */
  types: string[];
  typeOf: Int32Array;
  /** Element names, joined by line breaks (a name has none). */
  names: string;
  /** Per element, the start of its nodes in `nodes` (one more entry at the end). */
  nodeStart: Int32Array;
  nodes: Int32Array;
  /** Per type, the property keys its elements use; per element, one value per key of its type (NaN: not given). */
  propKeys: string[][];
  propStart: Int32Array;
  props: Float64Array;
  /** Likewise for the `at` frequencies. */
  atKeys: string[][];
  atStart: Int32Array;
  at: Float64Array;
  /** The few elements with text properties or prepared data (by element index). */
  extras: { index: number; text: Record<string, string>; data: unknown }[];
}

/** Packs the solving part of `circuit` (no source positions, specs, parameters or warnings). */
export function packCircuit(circuit: Circuit): PackedCircuit {
  const els = circuit.elements;
  const n = els.length;
  const typeIndex = new Map<string, number>();
  const types: string[] = [];
  const propKeys: string[][] = [];
  const atKeys: string[][] = [];
  const typeOf = new Int32Array(n);
  let nodeCount = 0;
  for (let e = 0; e < n; e++) {
    const el = els[e]!;
    let t = typeIndex.get(el.type);
    if (t === undefined) {
      t = types.length;
      typeIndex.set(el.type, t);
      types.push(el.type);
      propKeys.push([]);
      atKeys.push([]);
    }
    typeOf[e] = t;
    nodeCount += el.nodes.length;
    for (const k in el.props) if (!propKeys[t]!.includes(k)) propKeys[t]!.push(k);
    for (const k in el.at) if (!atKeys[t]!.includes(k)) atKeys[t]!.push(k);
  }
  const nodeStart = new Int32Array(n + 1);
  const nodes = new Int32Array(nodeCount);
  const propStart = new Int32Array(n + 1);
  const atStart = new Int32Array(n + 1);
  for (let e = 0; e < n; e++) {
    propStart[e + 1] = propStart[e]! + propKeys[typeOf[e]!]!.length;
    atStart[e + 1] = atStart[e]! + atKeys[typeOf[e]!]!.length;
  }
  const props = new Float64Array(propStart[n]!).fill(NaN);
  const at = new Float64Array(atStart[n]!).fill(NaN);
  const names: string[] = [];
  const extras: PackedCircuit['extras'] = [];
  let q = 0;
  for (let e = 0; e < n; e++) {
    const el = els[e]!;
    const t = typeOf[e]!;
    nodeStart[e] = q;
    for (let i = 0; i < el.nodes.length; i++) nodes[q++] = el.nodes[i]!;
    const pk = propKeys[t]!;
    for (let i = 0; i < pk.length; i++) {
      const v = el.props[pk[i]!];
      if (v !== undefined) props[propStart[e]! + i] = v;
    }
    const ak = atKeys[t]!;
    for (let i = 0; i < ak.length; i++) {
      const v = el.at[ak[i]!];
      if (v !== undefined) at[atStart[e]! + i] = v;
    }
    names.push(el.name);
    let hasText = false;
    for (const _ in el.text) {
      hasText = true;
      break;
    }
    if (hasText || el.data !== undefined) extras.push({ index: e, text: el.text, data: el.data });
  }
  nodeStart[n] = q;
  return {
    file: circuit.file,
    title: circuit.title,
    nodeNames: circuit.nodeNames,
    localReferences: circuit.localReferences,
    ports: circuit.ports.map((p) => ({ ...p, span: NO_SPAN })),
    types,
    typeOf,
    names: names.join('\n'),
    nodeStart,
    nodes,
    propKeys,
    propStart,
    props,
    atKeys,
    atStart,
    at,
    extras,
  };
}

/** Rebuilds a circuit that solves as the packed one (source positions left out). */
export function unpackCircuit(p: PackedCircuit): Circuit {
  const n = p.typeOf.length;
  const names = n > 0 ? p.names.split('\n') : [];
  const extra = new Map(p.extras.map((x) => [x.index, x]));
  const elements: ElementInstance[] = new Array(n);
  for (let e = 0; e < n; e++) {
    const t = p.typeOf[e]!;
    const nodes: number[] = [];
    for (let q = p.nodeStart[e]!; q < p.nodeStart[e + 1]!; q++) nodes.push(p.nodes[q]!);
    const props: Record<string, number> = {};
    const pk = p.propKeys[t]!;
    for (let i = 0; i < pk.length; i++) {
      const v = p.props[p.propStart[e]! + i]!;
      if (!Number.isNaN(v)) props[pk[i]!] = v;
    }
    const at: Record<string, number> = {};
    const ak = p.atKeys[t]!;
    for (let i = 0; i < ak.length; i++) {
      const v = p.at[p.atStart[e]! + i]!;
      if (!Number.isNaN(v)) at[ak[i]!] = v;
    }
    const x = extra.get(e);
    elements[e] = { type: p.types[t]!, name: names[e]!, nodes, nodeNames: [], props, at, span: NO_SPAN, text: x ? x.text : {}, data: x?.data };
  }
  return {
    file: p.file,
    title: p.title,
    nodeNames: p.nodeNames,
    elements,
    ports: p.ports,
    specs: [],
    localReferences: p.localReferences,
    frequencies: new Float64Array(0),
    parameters: [],
    variables: [],
    bindings: [],
    unfollowed: [],
    tolerances: [],
    lots: [],
    randomInputs: [],
    randomUnfollowed: [],
    warnings: [],
  };
}

// Types of engine.mjs (plain JavaScript so that scripts/fuzz.mjs can run it without a build).

export interface Rng {
  u32(): number;
  int(n: number): number;
  float(): number;
  chance(p: number): boolean;
  pick<T>(arr: readonly T[]): T;
}
export function makeRng(seed: number): Rng;

export interface Dictionary {
  words: string[];
  keywords: string[];
  elements: { keyword: string; terminals: string[]; properties: string[]; textProperties: { key: string; choices: readonly string[] }[] }[];
}
export function makeDictionary(elements: ReadonlyMap<string, { keyword: string; properties: readonly { key: string }[]; textProperties?: readonly { key: string; choices?: readonly string[] }[]; terminals: readonly { key: string }[] }>): Dictionary;

export function splitLines(text: string): string[];
export function mutate(text: string, op: readonly number[], dict: Dictionary, scale?: number): string;
export function generateNetlist(seed: number, dict: Dictionary, scale?: number): { text: string; files: Record<string, string>; origin: string };
export function generateTouchstone(seed: number): { text: string; name: string };
export function generateJsonNetwork(seed: number): { text: string; name: string };

/** A case as non-negative integers: the starting text (`family`, `seed`) and mutations `[kind, a, b, c]`. */
export interface CaseSpec {
  family: number;
  seed: number;
  ops: number[][];
  set?: number;
  sweep?: number;
}
export type FuzzCase =
  | { kind: 'netlist'; main: string; files: Record<string, string>; origin?: string; changed?: string[]; set?: string[]; sweep?: string }
  | { kind: 'data'; name: string; text: string; origin?: string };
export interface Corpus {
  netlists: string[];
  data: string[];
  files: Record<string, string>;
}
export function netlistCase(spec: CaseSpec, corpus: Corpus, dict: Dictionary, scale?: number): FuzzCase;
export function dataCase(spec: CaseSpec, corpus: Corpus, dict: Dictionary, scale?: number): FuzzCase;
export function randomSpec(rng: Rng, maxOps?: number): CaseSpec;

export type Status = 'ok' | 'located' | 'documented' | 'crash' | 'nonfinite';
export interface Outcome {
  status: Status;
  reason: string;
  message?: string;
  stack?: string;
}
export function linesOf(text: string): string[];
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export function judgeError(lib: any, e: unknown, sources: Map<string, string>): Outcome;
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export function runCase(lib: any, c: FuzzCase): Outcome;
export function failureClass(status: string, reason: string): string;
export function describeCase(c: FuzzCase, limit?: number): string;

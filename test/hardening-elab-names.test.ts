// Issue 14: a name that is a key of JavaScript objects, used where no parameter has it, is an
// unknown parameter like any other — a located error, never a TypeError. The scopes elaboration
// passes to the evaluator are Maps; the evaluator's own tables (constants, functions) are fixed in
// src/elaborate/evaluate.ts, so these checks need that fix as well.
import { describe, expect, it } from 'vitest';
import { InputError, type Diagnostic } from '../src/diagnostics/diagnostic.js';
import { loadNetlist, type LoadOptions } from '../src/load.js';

const lines = (...l: string[]) => l.join('\n') + '\n';
const NAMES = ['constructor', '__proto__', 'hasOwnProperty', 'toString', 'valueOf'];

function errorsOf(text: string, options: LoadOptions = {}): Diagnostic[] {
  try {
    loadNetlist(text, 'n.sbx', options);
  } catch (e) {
    if (e instanceof InputError) return e.diagnostics.filter((d) => d.severity === 'error');
    throw e; // a TypeError lands here and fails the test
  }
  throw new Error('expected an InputError');
}

describe('object-key names where no parameter has them', () => {
  it('`value=<name>` in the netlist: an unknown parameter at the name', () => {
    for (const name of NAMES) {
      const ds = errorsOf(lines('let x = 1', `resistor r a=in b=ground value=${name}`, 'port 1 plus=in', 'sweep list freqs=1 GHz'));
      expect(ds).toEqual([expect.objectContaining({ code: 'unknown-parameter', span: { file: 'n.sbx', line: 2, column: 32, length: name.length } })]);
    }
  });

  it('in a block body: an unknown parameter at the name', () => {
    for (const name of NAMES) {
      const ds = errorsOf(lines('block b terminals=p', `  resistor r a=p b=ground value=${name}`, 'end', 'b u1 p=in', 'port 1 plus=in', 'sweep list freqs=1 GHz'));
      expect(ds).toEqual([expect.objectContaining({ code: 'unknown-parameter', span: expect.objectContaining({ line: 2, column: 33 }) })]);
    }
  });

  it('`--set x=<name>` and `--sweep "list freqs=<name>"`: located at --set and --sweep', () => {
    const T = lines('let x = 50 ohm', 'resistor r a=in b=ground value=x', 'port 1 plus=in', 'sweep list freqs=1 GHz');
    for (const name of NAMES) {
      expect(errorsOf(T, { set: [`x=${name}`] })).toEqual([expect.objectContaining({ code: 'unknown-parameter', span: { file: '--set', line: 1, column: 3, length: name.length } })]);
      expect(errorsOf(T, { sweep: `list freqs=${name}` })).toEqual([expect.objectContaining({ code: 'unknown-parameter', span: { file: '--sweep', line: 1, column: 12, length: name.length } })]);
    }
  });
});

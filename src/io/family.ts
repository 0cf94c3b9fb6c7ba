/**
 * Writers of a family (the results of `vary`) as ONE file: JSON or CSV, with the varied variables
 * beside the network data of each member, so that a reader can split the file by member.
 *
 * JSON, schema `scatterbox.family/1` (our own):
 *
 * ```text
 * {
 *   "schema": "scatterbox.family/1",
 *   "title": string | null,
 *   "variables": [ { "name": "cshunt", "unit": "F" | null, "spacing": "linear" | "log" | "list" }, … ],
 *   "members": [
 *     {
 *       "member": 1,                        // the member's number, from 1, in the order of evaluation
 *       "label": "cshunt = 1 pF",
 *       "values": [1e-12],                  // SI units, in the order of "variables"
 *       "specs": [ { "name": "rl_band", "pass": true, "worst_margin": 3.2, "unit": "dB",
 *                    "worst_frequency_hz": 9.02e8 }, … ],
 *       "network": { …a whole scatterbox.network/1 document (see json.ts)… }
 *     }, …
 *   ]
 * }
 * ```
 *
 * Each member's `network` is exactly what `solve -o x.json` writes for that member, so it reads
 * back with the network JSON reader. Numbers as in json.ts (shortest round-trip text; non-finite
 * spec margins, from a spec with no points in its band, are written as null).
 *
 * CSV: one header row, then one row per member and frequency point, members in order:
 *
 * - column 1: `member`, the member's number from 1 (rows of one member are consecutive);
 * - then one column per varied variable, named `<name>_<unit>` (`cshunt_F`; `<name>` alone for a
 *   plain number), its value in SI units;
 * - then the columns of the network CSV (csv.ts): `freq_hz` and the entries.
 *
 * @module
 */

import type { SpecResult } from '../check/types.js';
import type { NetworkData } from '../network/types.js';
import { csvChunks, csvRow, type CsvWriteOptions } from './csv.js';
import { formatJson, type JsonWriteOptions } from './json.js';
import { formatShortest } from './touchstone.js';

export const FAMILY_SCHEMA_ID = 'scatterbox.family/1';

/** A varied variable, as the family files name it. */
export interface FamilyVariable {
  name: string;
  unit: string | null;
  spacing: 'linear' | 'log' | 'list';
}

/** One evaluated member of a family. */
export interface FamilyResult {
  /** 0-based; written as the member number index + 1. */
  index: number;
  label: string;
  /** Values of the varied variables, SI units, in the order of the variables. */
  values: number[];
  network: NetworkData;
  specs: SpecResult[];
}

/** Column name of a variable in the family CSV. */
export function familyColumn(v: FamilyVariable): string {
  return v.unit ? `${v.name}_${v.unit}` : v.name;
}

/** The family as JSON (schema in the module comment); every network is checked before any text is made. */
export function formatFamilyJson(title: string | undefined, variables: readonly FamilyVariable[], members: readonly FamilyResult[], opts: JsonWriteOptions = {}): string {
  const num = (x: number): string => (Number.isFinite(x) ? formatShortest(x) : 'null');
  const bodies = members.map((m) => formatJson(m.network, opts)); // checks every number first
  const out: string[] = [];
  out.push('{');
  out.push(`  "schema": ${JSON.stringify(FAMILY_SCHEMA_ID)},`);
  out.push(`  "title": ${title === undefined ? 'null' : JSON.stringify(title)},`);
  out.push(`  "variables": [${variables.map((v) => `{ "name": ${JSON.stringify(v.name)}, "unit": ${v.unit === null ? 'null' : JSON.stringify(v.unit)}, "spacing": ${JSON.stringify(v.spacing)} }`).join(', ')}],`);
  out.push('  "members": [');
  members.forEach((m, k) => {
    const specs = m.specs.map(
      (r) =>
        `{ "name": ${JSON.stringify(r.spec.name)}, "pass": ${r.pass}, "worst_margin": ${num(r.worstMargin)}, "unit": ${JSON.stringify(r.spec.unit)}, "worst_frequency_hz": ${num(r.worstFrequency)} }`,
    );
    const network = bodies[k]!.trimEnd().split('\n').join('\n      ');
    out.push('    {');
    out.push(`      "member": ${m.index + 1},`);
    out.push(`      "label": ${JSON.stringify(m.label)},`);
    out.push(`      "values": [${m.values.map(num).join(', ')}],`);
    out.push(`      "specs": [${specs.join(', ')}],`);
    out.push(`      "network": ${network}`);
    out.push(`    }${k + 1 < members.length ? ',' : ''}`);
  });
  out.push('  ]');
  out.push('}');
  return out.join('\n') + '\n';
}

/**
 * The family as CSV (layout in the module comment), in pieces; every member's data is checked
 * before the first piece. All members must have the same ports and parameter.
 */
export function familyCsvChunks(variables: readonly FamilyVariable[], members: readonly FamilyResult[], opts: CsvWriteOptions = {}): Iterable<string> {
  const first = members[0]?.network;
  for (const m of members) {
    if (first && (m.network.ports !== first.ports || m.network.parameter !== first.parameter)) {
      throw new RangeError(`the members of a family have different port counts (${first.ports} and ${m.network.ports}), so they do not fit one CSV table`);
    }
  }
  const parts = members.map((m) => csvChunks(m.network, opts)); // checks every number first
  return pieces();

  function* pieces(): Generator<string> {
    let header = true;
    for (const [k, m] of members.entries()) {
      const prefix = [String(m.index + 1), ...m.values.map((x) => formatShortest(x))].join(',');
      let rest = '';
      let seenHeader = false;
      for (const piece of parts[k]!) {
        rest += piece;
        const lines = rest.split('\n');
        rest = lines.pop()!;
        const out: string[] = [];
        for (const line of lines) {
          if (!seenHeader) {
            seenHeader = true;
            if (header) out.push(`${csvRow(['member', ...variables.map(familyColumn)])},${line}`);
            header = false;
            continue;
          }
          out.push(`${prefix},${line}`);
        }
        if (out.length > 0) yield out.join('\n') + '\n';
      }
      if (rest !== '') yield `${prefix},${rest}\n`;
    }
  }
}

/** {@link familyCsvChunks} joined. */
export function formatFamilyCsv(variables: readonly FamilyVariable[], members: readonly FamilyResult[], opts: CsvWriteOptions = {}): string {
  return Array.from(familyCsvChunks(variables, members, opts)).join('');
}

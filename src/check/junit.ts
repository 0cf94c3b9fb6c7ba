import type { Comparison } from './compare.js';
import type { SpecResult } from './types.js';
import { describeSpec, formatMargin, formatFrequency } from './format.js';

function esc(s: string): string {
  // characters XML 1.0 does not allow (control characters, lone surrogates) become U+FFFD
  return s.replace(/[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g, '\uFFFD').replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;');
}

/** One group of results (a netlist, or a golden-file comparison) for a JUnit report. */
export interface JunitSuite {
  name: string;
  /** A case has at most one of `failure` (a check that failed) and `error` (the check could not run). */
  cases: { name: string; failure?: { message: string; detail: string }; error?: { message: string; detail: string } }[];
}

/**
 * A run that stopped on an input error (a bad netlist, an unreadable golden file…) as a JUnit
 * suite: one test case in error, its text the messages as printed (file:line:column, the line, the caret).
 */
export function errorSuite(file: string, text: string): JunitSuite {
  const first = text.split('\n').find((l) => /error/.test(l)) ?? text.split('\n')[0] ?? '';
  return { name: file, cases: [{ name: 'load and solve', error: { message: first.trim(), detail: text } }] };
}

/** The spec results of one netlist as a JUnit suite: one test case per spec, named after it. */
export function specSuite(file: string, results: SpecResult[]): JunitSuite {
  return {
    name: file,
    cases: results.map((r) => ({
      name: r.spec.name,
      failure: r.pass
        ? undefined
        : {
            message:
              r.points === 0
                ? `no sweep point lies in the band of ${r.spec.name}`
                : `${r.spec.name} fails: worst margin ${formatMargin(r.worstMargin, r.spec.unit)} at ${formatFrequency(r.worstFrequency)}`,
            detail: `${describeSpec(r.spec)}\n${
              r.points === 0
                ? 'the sweep has no point inside the band'
                : `value ${formatMargin(r.worstValue, r.spec.unit)} against limit ${formatMargin(r.worstLimit, r.spec.unit)} at ${formatFrequency(r.worstFrequency)}`
            }\nspec defined at ${r.spec.span.file}:${r.spec.span.line}:${r.spec.span.column}`,
          },
    })),
  };
}

/** A golden-file comparison as a JUnit suite: one test case per matrix entry. */
export function comparisonSuite(file: string, c: Comparison): JunitSuite {
  return {
    name: `golden ${file}`,
    cases: c.entries.map((e) => {
      const name = `S${e.i}${e.j}`;
      if (e.pass) return { name };
      const detail =
        c.tolerance.abs !== undefined
          ? `|Δ| ${e.abs.toExponential(3)} at ${formatFrequency(e.absFrequency)} (tolerance ${c.tolerance.abs})`
          : `Δ|S| ${Number.isNaN(e.dbFrequency) ? 'not judged' : `${e.db.toFixed(4)} dB at ${formatFrequency(e.dbFrequency)}`}, Δ∠ ${Number.isNaN(e.degFrequency) ? 'not judged' : `${e.deg.toFixed(3)}° at ${formatFrequency(e.degFrequency)}`} (tolerance ${c.tolerance.db} dB, ${c.tolerance.deg}°; not judged below ${c.tolerance.floorDb} dB)`;
      return { name, failure: { message: `${name} deviates from ${file}: ${detail}`, detail } };
    }),
  };
}

/**
 * A JUnit XML report (the format CI systems ingest): a `<testsuites>` root, one `<testsuite>`
 * per group and one `<testcase>` per check, a failing one with a `<failure>` element, one that
 * could not run (an input error) with an `<error>` element.
 * Deterministic: no timestamps, no host names.
 */
export function formatJunit(suites: JunitSuite[]): string {
  const total = suites.reduce((n, s) => n + s.cases.length, 0);
  const failures = suites.reduce((n, s) => n + s.cases.filter((c) => c.failure).length, 0);
  const errors = suites.reduce((n, s) => n + s.cases.filter((c) => c.error).length, 0);
  const out = ['<?xml version="1.0" encoding="UTF-8"?>', `<testsuites name="scatterbox" tests="${total}" failures="${failures}" errors="${errors}">`];
  for (const s of suites) {
    const f = s.cases.filter((c) => c.failure).length;
    const e = s.cases.filter((c) => c.error).length;
    out.push(`  <testsuite name="${esc(s.name)}" tests="${s.cases.length}" failures="${f}" errors="${e}" skipped="0">`);
    for (const c of s.cases) {
      const head = `    <testcase classname="${esc(s.name)}" name="${esc(c.name)}"`;
      if (!c.failure && !c.error) {
        out.push(`${head}/>`);
        continue;
      }
      out.push(`${head}>`);
      if (c.error) out.push(`      <error type="input" message="${esc(c.error.message)}">${esc(c.error.detail)}</error>`);
      else if (c.failure) out.push(`      <failure type="spec" message="${esc(c.failure.message)}">${esc(c.failure.detail)}</failure>`);
      out.push('    </testcase>');
    }
    out.push('  </testsuite>');
  }
  out.push('</testsuites>');
  return out.join('\n') + '\n';
}

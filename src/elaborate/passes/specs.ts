/**
 * The specs pass: the `spec` statements read (src/elaborate/spec.ts) once the port count is
 * known, each name used once.
 *
 * @module
 */
import type { SourceSpan } from '../../diagnostics/diagnostic.js';
import { keyArgs, numberArg } from '../args.js';
import { elaborateSpec } from '../spec.js';
import type { ElabState } from '../state.js';

export function specsPass(s: ElabState): void {
  const specNames = new Map<string, SourceSpan>();
  for (const st of s.specStatements) {
    const spec = elaborateSpec(st, s.portList.length, s.bag, (a, u, q) => numberArg(s, a, u, q, s.topContext), (x, allowed, what) => keyArgs(s, x, allowed, what), (k) => s.suggestedKeys.has(k));
    if (!spec) continue;
    const first = specNames.get(spec.name);
    if (first) {
      s.bag.error('duplicate-name', `a spec named \`${spec.name}\` exists already (line ${first.line})`, st.label!.span);
      continue;
    }
    specNames.set(spec.name, st.label!.span);
    s.specs.push(spec);
  }
}

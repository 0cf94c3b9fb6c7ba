/**
 * A live session: one netlist, its last good design model and the values the page has tuned.
 * New values go through DesignModel.setValues and solve (the fast path: the netlist is not read
 * again); a change of the netlist on disk loads it again, and a netlist with errors keeps the
 * last good result and holds its diagnostics, formatted as on the terminal.
 *
 * @module
 */
import { createHash } from 'node:crypto';
import { resolve } from 'node:path';
import { evaluateSpecs } from '../check/evaluate.js';
import { DesignModel } from '../design/model.js';
import { editVariableValues, netlistValue, WriteBackError } from '../design/write-back.js';
import { formatDiagnostics, InputError } from '../diagnostics/diagnostic.js';
import { writeFileAtomicSync } from '../io/atomic.js';
import { readInputText } from '../io/source-file.js';
import { loadNetlist } from '../load.js';
import { reportContent, type ReportContent, type ReportInput } from '../report/html.js';
import { renderReport } from '../report/index.js';
import { defaultEntries } from '../report/model.js';
import { sliderOf } from './sliders.js';
import type { LivePage } from '../report/live.js';

/** A result as the page takes it (the body of a `result` event or of a request's answer). */
export interface LiveResult {
  /** The page's layout: a page of another layout reloads itself. */
  layout: string;
  /** The variable values of the result, SI units. */
  values: number[];
  content: { data: ReportContent['data']; verdict: ReportContent['verdict']; html: Omit<ReportContent['html'], 'smith'> };
  /** The netlist's diagnostics when its latest version does not load (the result is the last good one). */
  diagnostics?: string;
  /** What brought the result (shown on the page). */
  why?: string;
}

/** A request the session refuses (bad values): the status 400 and a plain message. */
export class LiveRequestError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'LiveRequestError';
  }
}

/** Sources of a load that are no files: the command line's overrides. */
const NOT_FILES = new Set(['--set', '--sweep']);

export class LiveSession {
  /** The netlist as given (diagnostics name it so). */
  readonly netlist: string;
  /** The netlist's own files (absolute): the netlist, its included files and data files. */
  readonly files = new Set<string>();
  private model: DesignModel | undefined;
  private current: Float64Array = new Float64Array(0);
  /** The diagnostics of the netlist's latest version, when it does not load. */
  diagnostics: string | undefined;

  constructor(netlist: string) {
    this.netlist = netlist;
    this.files.add(resolve(netlist));
  }

  /** Whether a good result is at hand. */
  get ready(): boolean {
    return this.model !== undefined;
  }

  /** The variables of the last good netlist. */
  get variables() {
    return this.model?.variables ?? [];
  }

  /**
   * Reads the netlist again. On success the values are the netlist's; on an input error the last
   * good model stays and `diagnostics` holds the located messages. Returns whether it loaded.
   */
  load(): boolean {
    try {
      const model = DesignModel.load(this.netlist);
      this.model = model;
      this.current = model.values;
      this.diagnostics = undefined;
      this.addFiles(model.sources.keys());
      return true;
    } catch (e) {
      if (e instanceof InputError) {
        if (e.sources) this.addFiles(e.sources.keys());
        this.diagnostics = `${formatDiagnostics(e.diagnostics, e.sources)}\n\n${countErrors(e)}; the page shows the last good result`;
      } else {
        this.diagnostics = `error: ${messageOf(e)}\n\nthe page shows the last good result`;
      }
      return false;
    }
  }

  private addFiles(names: Iterable<string>): void {
    for (const f of names) if (!NOT_FILES.has(f)) this.files.add(resolve(f));
  }

  /**
   * Sets new values (SI units, one per variable, in netlist order): each is taken as the netlist
   * reads its short text (`6.8 nH`), kept within its variable's range. Throws LiveRequestError for
   * anything but that many finite numbers.
   */
  setValues(values: unknown): void {
    const model = this.need();
    const vars = model.variables;
    if (!Array.isArray(values) || values.length !== vars.length || !values.every((x) => typeof x === 'number' && Number.isFinite(x))) {
      throw new LiveRequestError(`expected ${vars.length} finite number${vars.length === 1 ? '' : 's'} (the values of ${vars.map((v) => v.name).join(', ') || 'no variables'})`);
    }
    const next = vars.map((v, i) => Math.min(v.upper, Math.max(v.lower, netlistValue(values[i] as number, v.unit))));
    model.setValues(next);
    this.current = Float64Array.from(next);
  }

  /** Back to the values of the netlist on disk (as last loaded). */
  reset(): void {
    const model = this.need();
    model.setValues(model.nominalValues);
    this.current = model.nominalValues;
  }

  private need(): DesignModel {
    if (!this.model) throw new LiveRequestError(`${this.netlist} has not loaded yet: fix the errors shown and save it`);
    return this.model;
  }

  /** The result at the current values. */
  result(why?: string): LiveResult {
    const model = this.need();
    const content = this.content(model);
    const { smith: _figure, ...html } = content.html;
    return { layout: this.layout(content), values: Array.from(this.current), content: { data: content.data, verdict: content.verdict, html }, diagnostics: this.diagnostics, why };
  }

  private content(model: DesignModel): ReportContent {
    return reportContent(this.input(model));
  }

  /** What the report is made of at the current values. */
  private input(model: DesignModel): ReportInput {
    const net = model.solve();
    // where a spec depends on a variable (not on the fast path), the circuit at the values has it
    const circuit = model.followsVariables ? model.circuit : model.currentCircuit();
    // the entries named, not the default merge of equal ones (S11 = S22 of a symmetric design):
    // a slider that breaks the symmetry then changes the values, not the page's layout
    return { source: this.netlist, net, circuit, specs: evaluateSpecs(circuit.specs, net), entries: defaultEntries(net.ports) };
  }

  /** The signature of what the page is made of: variables, sweep, entries and plots. */
  private layout(c: ReportContent): string {
    const d = c.data;
    const vars = this.variables.map((v) => [v.name, v.lower, v.upper, v.unit, v.series ?? null, v.step ?? null]);
    const shape = JSON.stringify([vars, d.f, d.ports, d.xUnit, d.logX, d.entries.map((e) => e.label), d.plots, d.smith, d.title]);
    return createHash('sha256').update(shape).digest('base64url').slice(0, 22);
  }

  /** The whole page at the current values; `base` is the path its requests start with. */
  page(base: string): string {
    const model = this.model;
    if (!model) return waitingPage(this.netlist, this.diagnostics ?? '');
    const input = this.input(model);
    const live: LivePage = { base, sliders: model.variables.map((v, i) => sliderOf(v, this.current[i]!)), layout: this.layout(reportContent(input)), diagnostics: this.diagnostics };
    return renderReport({ ...input, live });
  }

  /**
   * Writes the values into the netlist's own files (only the value text of each changed `let`
   * line; atomically). Refuses when a file changed on disk since it was read (the page is about
   * to follow it), and writes nothing outside the netlist's own files. Returns the files written.
   */
  writeBack(values: unknown): string[] {
    this.setValues(values);
    const model = this.need();
    const sources = model.sources;
    const file = this.netlist;
    for (const [f, text] of sources) {
      if (NOT_FILES.has(f)) continue;
      let now: string;
      try {
        now = readInputText(f);
      } catch {
        throw new WriteBackError(`${f} cannot be read any more`, 'save the netlist again; the page follows it');
      }
      if (now !== text) throw new WriteBackError(`${f} changed on disk since the page read it`, 'the page follows the change in a moment; then write again');
    }
    const read = (p: string) => sources.get(p) ?? readInputText(p);
    const own = loadNetlist(sources.get(file)!, file, { readFile: read }).circuit.variables;
    const texts = editVariableValues(file, sources, own, this.current, read);
    for (const f of texts.keys()) {
      if (!this.files.has(resolve(f))) throw new WriteBackError(`${f} is not one of the netlist's own files`);
    }
    for (const [f, text] of texts) writeFileAtomicSync(f, text);
    return [...texts.keys()];
  }
}

function countErrors(e: InputError): string {
  const n = e.diagnostics.filter((d) => d.severity === 'error').length;
  return `${n} error${n === 1 ? '' : 's'}`;
}

function messageOf(e: unknown): string {
  const m = e instanceof Error ? e.message : String(e);
  // never a function's name in front of a message
  return m.replace(/^[a-z]+[A-Z][A-Za-z0-9]*: /, '');
}

/** The page while the netlist has never loaded: its diagnostics, and a reload when it does. */
function waitingPage(netlist: string, diagnostics: string): string {
  const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
  return [
    '<!doctype html><html lang="en"><head><meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; script-src 'unsafe-inline'; connect-src 'self'; base-uri 'none'; form-action 'none'">`,
    `<title>${esc(netlist)} · scatterbox live</title>`,
    '<style>body{font-family:system-ui,sans-serif;margin:24px;color:#1b2330}pre{background:#fff5f3;border:1px solid #e9b4ad;padding:8px 12px;border-radius:6px;overflow-x:auto}</style></head><body>',
    `<h1>${esc(netlist)}</h1><p>The netlist does not load yet; the page shows the result as soon as it does.</p>`,
    `<pre data-testid="diagnostics">${esc(diagnostics)}</pre>`,
    "<script>new EventSource('events').addEventListener('result', function () { location.reload(); });</script>",
    '</body></html>',
  ].join('\n');
}

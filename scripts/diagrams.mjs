#!/usr/bin/env node
// Writes grammar/diagrams.html: railroad diagrams of the netlist grammar, drawn from the parser
// itself so that they cannot drift from it.
//
// Run `npx tsc -p .` first (this script reads the compiled parser from dist/), then
// `npm run diagrams`.
//
// chevrotain's generator writes a page that loads its drawing scripts and style sheet from a CDN.
// The page we ship must work offline, so every one of those references is replaced by the file's
// contents, read from the installed chevrotain package (its diagrams/ folder, which also carries
// the railroad-diagrams drawing library under vendor/).

import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { createSyntaxDiagramsCode } from 'chevrotain';

const here = dirname(fileURLToPath(import.meta.url));
const root = resolve(here, '..');
const compiledParser = join(root, 'dist', 'src', 'parse', 'parser.js');
const outFile = join(root, 'grammar', 'diagrams.html');

if (!existsSync(compiledParser)) {
  console.error(`diagrams: ${relative(process.cwd(), compiledParser)} is missing; run \`npx tsc -p .\` first`);
  process.exit(1);
}
const { parser } = await import(pathToFileURL(compiledParser).href);

// chevrotain's entry point is <package>/lib/src/api.js; its diagram assets sit in <package>/diagrams/.
const chevrotainRoot = resolve(dirname(fileURLToPath(import.meta.resolve('chevrotain'))), '..', '..');
const assetsDir = join(chevrotainRoot, 'diagrams');
if (!existsSync(assetsDir)) {
  console.error(`diagrams: no diagrams/ folder in ${chevrotainRoot}; cannot inline the drawing scripts`);
  process.exit(1);
}

// Placeholders stand in for the CDN addresses, so that every reference can be found and replaced.
const BASE = 'inline-asset:/';
const CSS = 'inline-asset:/diagrams.css';
let html = createSyntaxDiagramsCode(parser.getSerializedGastProductions(), { resourceBase: BASE, css: CSS });

const readAsset = (name) => {
  const file = join(assetsDir, name);
  if (!existsSync(file)) {
    console.error(`diagrams: ${relative(process.cwd(), file)} is missing; cannot inline it`);
    process.exit(1);
  }
  return readFileSync(file, 'utf8');
};
/** Text placed inside <script> must not close the element early. */
const scriptSafe = (text) => text.replace(/<\/(script)/gi, '<\\/$1');
const styleSafe = (text) => text.replace(/<\/(style)/gi, '<\\/$1');

let inlined = 0;
html = html.replace(/<link rel='stylesheet' href='([^']*)'>/g, (tag, href) => {
  if (href !== CSS) throw new Error(`diagrams: unexpected style sheet ${href}`);
  inlined++;
  return `<style>\n/* inlined from chevrotain/diagrams/diagrams.css */\n${styleSafe(readAsset('diagrams.css'))}\n</style>`;
});
html = html.replace(/<script src='([^']*)'><\/script>/g, (tag, src) => {
  if (!src.startsWith(BASE)) throw new Error(`diagrams: unexpected script ${src}`);
  const name = src.slice(BASE.length);
  inlined++;
  return `<script>\n// inlined from chevrotain/diagrams/${name}\n${scriptSafe(readAsset(name))}\n</script>`;
});

// The serialized grammar holds token patterns as text; keep it from closing its <script> early too.
html = html.replace(/(window\.serializedGrammar = )([\s\S]*?)(;\s*<\/script>)/, (_, a, json, c) => a + scriptSafe(json) + c);

// A title and a line pointing back to the written reference.
html = html.replace(
  '<meta charset="utf-8">',
  '<meta charset="utf-8">\n<title>scatterbox netlist grammar: syntax diagrams</title>',
);
html = html.replace(
  '<div id="diagrams" align="center"></div>',
  '<p style="text-align:center;font-family:sans-serif">Syntax diagrams of the scatterbox netlist grammar, generated from the parser by <code>npm run diagrams</code>. ' +
    'The meaning of each statement is in <a href="README.md">README.md</a>.</p>\n<div id="diagrams" align="center"></div>',
);

const leftovers = [...html.matchAll(/(?:src|href)\s*=\s*['"]((?:https?:)?\/\/[^'"]*|inline-asset:[^'"]*)['"]/gi)].map((m) => m[1]);
if (inlined !== 5 || leftovers.length > 0) {
  console.error(`diagrams: expected to inline 5 assets (did ${inlined}); outside references left: ${leftovers.join(', ') || 'none'}`);
  process.exit(1);
}

mkdirSync(dirname(outFile), { recursive: true });
writeFileSync(outFile, html);
console.log(`diagrams: wrote ${relative(process.cwd(), outFile)} (${html.length} bytes, ${inlined} assets inlined, no outside references)`);

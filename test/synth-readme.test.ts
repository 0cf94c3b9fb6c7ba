// The README's synthesis examples must be true: each `scatterbox design` command shown prints what
// the README shows (run in a scratch folder, so the written files land there).
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');
const readme = readFileSync(join(root, 'README.md'), 'utf8');
const section = readme.slice(readme.indexOf('## Synthesis'), readme.indexOf('## Outputs'));
/** Blocks that hold one `$ scatterbox design` command (its continuation lines joined) and its output. */
const examples = [...section.matchAll(/```\n([\s\S]*?)```/g)]
  .map((m) => m[1]!)
  .filter((b) => b.startsWith('$ scatterbox design') && (b.match(/^\$ /gm) ?? []).length === 1 && !b.includes('--load-file'))
  .map((b) => {
    const lines = b.split('\n');
    let n = 1;
    let command = lines[0]!;
    while (command.endsWith('\\')) command = command.slice(0, -1) + ' ' + lines[n++]!.trim();
    return { command: command.replace(/^\$ scatterbox /, ''), output: lines.slice(n).join('\n') };
  });
let dir: string;

beforeAll(() => {
  if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npm test runs tsc before vitest');
  dir = mkdtempSync(join(tmpdir(), 'sbx-readme-synth-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('README: synthesis', () => {
  it('has examples to check', () => {
    expect(examples.length).toBeGreaterThanOrEqual(5);
  });
  for (const ex of examples) {
    it(`prints what the README shows for \`${ex.command.slice(0, 60)}…\``, () => {
      const args = [...ex.command.matchAll(/"([^"]*)"|(\S+)/g)].map((m) => m[1] ?? m[2]!);
      const r = spawnSync(process.execPath, [cli, ...args], { cwd: dir, encoding: 'utf8' });
      expect(r.stdout + r.stderr).toBe(ex.output);
    });
  }
});

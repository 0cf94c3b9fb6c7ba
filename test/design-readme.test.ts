// The README's design-exploration examples must be true: what `vary`, `fit`, `sensitivity` and `yield`
// print on the demos is what the README shows (the examples are taken from the README's own text).
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');
const readme = readFileSync(join(root, 'README.md'), 'utf8');
const section = readme.slice(readme.indexOf('## Design exploration'), readme.indexOf('## Outputs'));
/** The code blocks of the section, in order, with their language. */
const blocks = [...section.matchAll(/```(\w*)\n([\s\S]*?)```/g)].map((m) => ({ lang: m[1]!, body: m[2]! }));
let dir: string;

function run(args: string[]) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

/** The command of a `sh` block (its first line), as arguments, with `-o` sent to a scratch folder. */
function argsOf(body: string): string[] {
  const line = body.split('\n')[0]!.replace(/^npx scatterbox /, '');
  const args = [...line.matchAll(/'([^']*)'|"([^"]*)"|(\S+)/g)].map((m) => m[1] ?? m[2] ?? m[3]!);
  const o = args.indexOf('-o');
  if (o >= 0) args[o + 1] = join(dir, args[o + 1]!);
  return args;
}

beforeAll(() => {
  if (!existsSync(join(root, 'dist', 'bin', 'cli.js'))) throw new Error('build first: npm test runs tsc before vitest');
  dir = mkdtempSync(join(tmpdir(), 'sbx-readme-design-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('README: design exploration', () => {
  it('shows what `fit` prints for its example', () => {
    const i = blocks.findIndex((b) => b.lang === 'sh' && b.body.startsWith('npx scatterbox fit'));
    const r = run(argsOf(blocks[i]!.body));
    expect(r.code).toBe(0);
    expect(r.out).toBe(blocks[i + 1]!.body);
  });

  it('shows what `sensitivity` prints for its example (the lines shown)', () => {
    const i = blocks.findIndex((b) => b.lang === 'sh' && b.body.startsWith('npx scatterbox sensitivity'));
    const r = run(argsOf(blocks[i]!.body));
    expect(r.code).toBe(0);
    const shown = blocks[i + 1]!.body.replace(/…\n$/, '');
    expect(r.out.startsWith(shown)).toBe(true);
  });

  it('shows what `yield` prints for each of its examples', () => {
    const at = blocks.flatMap((b, i) => (b.lang === 'sh' && b.body.startsWith('npx scatterbox yield') ? [i] : []));
    expect(at.length).toBe(2);
    for (const i of at) {
      const r = run(argsOf(blocks[i]!.body));
      expect(r.code).toBe(0);
      expect(r.out).toBe(blocks[i + 1]!.body);
    }
  });

  it('shows what `vary` prints for its example (the summary)', () => {
    const i = blocks.findIndex((b) => b.lang === 'sh' && b.body.startsWith('npx scatterbox vary'));
    const r = run(argsOf(blocks[i]!.body));
    expect(r.code).toBe(0);
    const shown = blocks[i + 1]!.body;
    expect(r.out.endsWith(shown)).toBe(true);
  });
});

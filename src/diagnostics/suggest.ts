/** Optimal-string-alignment edit distance (insertions, deletions, substitutions, adjacent swaps). */
export function editDistance(a: string, b: string): number {
  const m = a.length;
  const n = b.length;
  const d: number[][] = Array.from({ length: m + 1 }, (_, i) => {
    const row = new Array<number>(n + 1).fill(0);
    row[0] = i;
    return row;
  });
  for (let j = 0; j <= n; j++) d[0]![j] = j;
  for (let i = 1; i <= m; i++) {
    for (let j = 1; j <= n; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let v = Math.min(d[i - 1]![j]! + 1, d[i]![j - 1]! + 1, d[i - 1]![j - 1]! + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) v = Math.min(v, d[i - 2]![j - 2]! + 1);
      d[i]![j] = v;
    }
  }
  return d[m]![n]!;
}

/** Words longer than this get no suggestion. */
const MAX_SUGGESTED_LENGTH = 64;

/**
 * The closest candidate to `word`, if close enough to be a plausible slip of the keyboard:
 * a case-only difference always qualifies; otherwise the distance must be at most a third of the
 * word's length (at least 1).
 */
export function closest(word: string, candidates: Iterable<string>): string | undefined {
  // no name of ours is this long, and the distance costs the product of the two lengths
  if (word.length > MAX_SUGGESTED_LENGTH) return undefined;
  const limit = Math.max(1, Math.floor(word.length / 3));
  let best: string | undefined;
  let bestScore = Infinity;
  const lower = word.toLowerCase();
  for (const c of candidates) {
    if (c === word || Math.abs(c.length - word.length) > limit) continue;
    const score = c.toLowerCase() === lower ? 0.5 : editDistance(word, c);
    if (score < bestScore) {
      bestScore = score;
      best = c;
    }
  }
  return best !== undefined && bestScore <= limit ? best : undefined;
}

/** "did you mean `x`?" or undefined. */
export function didYouMean(word: string, candidates: Iterable<string>): string | undefined {
  const c = closest(word, candidates);
  return c === undefined ? undefined : `did you mean \`${c}\`?`;
}

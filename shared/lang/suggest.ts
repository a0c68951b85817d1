/** Did-you-mean suggestions by edit distance. */

/** Optimal-string-alignment distance (Levenshtein plus adjacent transpositions). */
export function editDistance(a: string, b: string): number {
  const n = a.length;
  const m = b.length;
  if (n === 0) return m;
  if (m === 0) return n;
  const d: number[][] = [];
  for (let i = 0; i <= n; i++) {
    d.push(new Array<number>(m + 1).fill(0));
    d[i][0] = i;
  }
  for (let j = 0; j <= m; j++) d[0][j] = j;
  for (let i = 1; i <= n; i++) {
    for (let j = 1; j <= m; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let v = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) v = Math.min(v, d[i - 2][j - 2] + 1);
      d[i][j] = v;
    }
  }
  return d[n][m];
}

/** The closest candidate within a distance that grows with the word's length, or undefined. */
export function closest(word: string, candidates: Iterable<string>): string | undefined {
  const limit = word.length <= 3 ? 1 : word.length <= 6 ? 2 : 3;
  let best: string | undefined;
  let bestD = Infinity;
  const lw = word.toLowerCase();
  for (const c of candidates) {
    if (c === word) continue;
    const dist = c.toLowerCase() === lw ? 0.5 : editDistance(word, c);
    if (dist < bestD || (dist === bestD && best !== undefined && c < best)) {
      bestD = dist;
      best = c;
    }
  }
  return bestD <= limit ? best : undefined;
}

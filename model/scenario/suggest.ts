// "Did you mean ...?" for misspelt keys and kinds.

/** Edit distance (insertions, deletions, substitutions), case-insensitive. */
export function editDistance(a: string, b: string): number {
  const s = a.toLowerCase();
  const t = b.toLowerCase();
  let prev = Array.from({ length: t.length + 1 }, (_, j) => j);
  for (let i = 1; i <= s.length; i++) {
    const row = [i];
    for (let j = 1; j <= t.length; j++) {
      row[j] = Math.min(prev[j] + 1, row[j - 1] + 1, prev[j - 1] + (s[i - 1] === t[j - 1] ? 0 : 1));
    }
    prev = row;
  }
  return prev[t.length];
}

/** Candidates close enough to the word to be what was meant, nearest first. */
export function closest(word: string, candidates: readonly string[], max = 3): string[] {
  const limit = Math.max(2, Math.floor(word.length / 3));
  return candidates
    .map((c) => ({ c, d: editDistance(word, c) }))
    .filter(
      ({ c, d }) =>
        d <= limit ||
        (word.length > 2 &&
          (c.toLowerCase().startsWith(word.toLowerCase()) || word.toLowerCase().startsWith(c.toLowerCase()))),
    )
    .sort((x, y) => x.d - y.d)
    .slice(0, max)
    .map(({ c }) => c);
}

/** "; did you mean 'a'?" or "" when nothing is close. */
export function didYouMean(word: string, candidates: readonly string[]): string {
  const near = closest(word, candidates, 1);
  return near.length ? `; did you mean '${near[0]}'?` : '';
}

const ALPHABET = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ";

function letterName(k: number): string {
  return k < ALPHABET.length ? ALPHABET[k] : `${ALPHABET[k % ALPHABET.length]}${Math.floor(k / ALPHABET.length)}`;
}

function isSubset(a: ReadonlySet<number>, b: ReadonlySet<number>): boolean {
  for (const x of a) if (!b.has(x)) return false;
  return true;
}

/** Drops every column contained in another (keeping one of two equal columns). */
function absorb(columns: Set<number>[]): Set<number>[] {
  return columns.filter(
    (col, k) => !columns.some((other, m) => m !== k && isSubset(col, other) && (col.size < other.size || m < k)),
  );
}

/**
 * Compact letter display by Piepho's insert-and-absorb algorithm with the sweeping step
 * (Piepho 2004, J. Comput. Graph. Stat. 13:456–466): start with one letter for all means; for
 * each significantly different pair (i, j), split every letter holding both into a copy without i
 * and a copy without j, then absorb letters contained in others; finally sweep out letters a
 * mean does not need. Two means share a letter exactly when they do not differ significantly.
 *
 * `means` fixes the naming: 'a' goes to the letter of the highest mean, 'b' to the next, ….
 * Returns one letter string per mean, in the input order.
 */
export function compactLetterDisplay(means: readonly number[], differs: (i: number, j: number) => boolean): string[] {
  const k = means.length;
  let columns: Set<number>[] = [new Set(means.map((_, i) => i))];
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      if (!differs(i, j)) continue;
      const next: Set<number>[] = [];
      for (const col of columns) {
        if (col.has(i) && col.has(j)) {
          next.push(new Set([...col].filter((x) => x !== i)), new Set([...col].filter((x) => x !== j)));
        } else {
          next.push(col);
        }
      }
      columns = absorb(next);
    }
  }

  // Sweep: remove mean i from a letter if every mean sharing that letter also shares another with i,
  // and i keeps at least one letter.
  for (const col of columns) {
    for (const i of [...col]) {
      const others = columns.filter((c) => c !== col && c.has(i));
      if (others.length === 0) continue;
      const covered = [...col].every((j) => j === i || others.some((c) => c.has(j)));
      if (covered) col.delete(i);
    }
  }
  columns = absorb(columns.filter((c) => c.size > 0));

  // 'a' for the letter holding the highest mean, then by the next-highest mean each letter holds.
  const rank = means.map((_, i) => i).sort((a, b) => means[b] - means[a] || a - b);
  const position = new Map(rank.map((idx, pos) => [idx, pos]));
  const ordered = columns
    .map((col) => [...col].map((i) => position.get(i)!).sort((a, b) => a - b))
    .sort((a, b) => {
      for (let m = 0; m < Math.min(a.length, b.length); m++) if (a[m] !== b[m]) return a[m] - b[m];
      return a.length - b.length;
    });
  const out = means.map(() => "");
  ordered.forEach((col, letter) => {
    for (const pos of col) out[rank[pos]] += letterName(letter);
  });
  return out;
}

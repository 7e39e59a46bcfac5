const ALPHABET = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ";

function letterName(k: number): string {
  return k < ALPHABET.length ? ALPHABET[k] : `${ALPHABET[k % ALPHABET.length]}${Math.floor(k / ALPHABET.length)}`;
}

/**
 * A letter's set of means as a bitset (32 means per word): the algorithm splits and compares
 * sets once per significant pair, thousands of times for a many-treatment trial.
 */
type MeanBits = Uint32Array;

const has = (set: MeanBits, i: number) => (set[i >>> 5] & (1 << (i & 31))) !== 0;

function without(set: MeanBits, i: number): MeanBits {
  const copy = set.slice();
  copy[i >>> 5] &= ~(1 << (i & 31));
  return copy;
}

function members(set: MeanBits, k: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < k; i++) if (has(set, i)) out.push(i);
  return out;
}

function size(set: MeanBits): number {
  let count = 0;
  for (let word of set) {
    for (; word !== 0; count++) word &= word - 1;
  }
  return count;
}

function isSubset(a: MeanBits, b: MeanBits): boolean {
  for (let w = 0; w < a.length; w++) if ((a[w] & ~b[w]) !== 0) return false;
  return true;
}

/** Drops every column contained in another (keeping one of two equal columns). */
function absorb(columns: MeanBits[]): MeanBits[] {
  const sizes = columns.map(size);
  return columns.filter(
    (col, k) => !columns.some((other, m) => m !== k && isSubset(col, other) && (sizes[k] < sizes[m] || m < k)),
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
  const all: MeanBits = new Uint32Array(Math.max(1, Math.ceil(k / 32)));
  for (let i = 0; i < k; i++) all[i >>> 5] |= 1 << (i & 31);
  let columns: MeanBits[] = [all];
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      if (!differs(i, j)) continue;
      const next: MeanBits[] = [];
      for (const col of columns) {
        if (has(col, i) && has(col, j)) next.push(without(col, i), without(col, j));
        else next.push(col);
      }
      columns = absorb(next);
    }
  }

  // Sweep: remove mean i from a letter if every mean sharing that letter also shares another with i,
  // and i keeps at least one letter.
  for (const col of columns) {
    for (const i of members(col, k)) {
      const others = columns.filter((c) => c !== col && has(c, i));
      if (others.length === 0) continue;
      const covered = members(col, k).every((j) => j === i || others.some((c) => has(c, j)));
      if (covered) col[i >>> 5] &= ~(1 << (i & 31));
    }
  }
  columns = absorb(columns.filter((c) => size(c) > 0));

  // 'a' for the letter holding the highest mean, then by the next-highest mean each letter holds.
  const rank = means.map((_, i) => i).sort((a, b) => means[b] - means[a] || a - b);
  const position = new Map(rank.map((idx, pos) => [idx, pos]));
  const ordered = columns
    .map((col) => members(col, k).map((i) => position.get(i)!).sort((a, b) => a - b))
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

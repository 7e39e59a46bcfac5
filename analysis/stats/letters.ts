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

/**
 * Drops every column contained in another (keeping the first of equal columns). Only the columns
 * flagged in `mayBeAbsorbed` are tested (all when it is omitted); the others are known to lie in
 * no other column. Plain loops: this runs once per significant pair.
 */
function absorb(columns: MeanBits[], mayBeAbsorbed?: readonly boolean[]): MeanBits[] {
  const sizes = columns.map(size);
  const kept: MeanBits[] = [];
  for (let k = 0; k < columns.length; k++) {
    let absorbed = false;
    if (mayBeAbsorbed === undefined || mayBeAbsorbed[k]) {
      for (let m = 0; m < columns.length && !absorbed; m++) {
        absorbed = m !== k && isSubset(columns[k], columns[m]) && (sizes[k] < sizes[m] || m < k);
      }
    }
    if (!absorbed) kept.push(columns[k]);
  }
  return kept;
}

/** Whether some letter in `letters` holds mean j. */
function anyHolds(letters: readonly MeanBits[], j: number): boolean {
  for (let c = 0; c < letters.length; c++) if (has(letters[c], j)) return true;
  return false;
}

/**
 * The insert-and-absorb step: starting from one letter for all k means, for each significantly
 * different pair (i, j) every letter holding both is split into a copy without i and a copy
 * without j, and letters contained in others are absorbed.
 */
function insertAndAbsorb(k: number, differs: (i: number, j: number) => boolean): MeanBits[] {
  const all: MeanBits = new Uint32Array(Math.max(1, Math.ceil(k / 32)));
  for (let i = 0; i < k; i++) all[i >>> 5] |= 1 << (i & 31);
  let columns: MeanBits[] = [all];
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      if (!differs(i, j)) continue;
      const next: MeanBits[] = [];
      const split: boolean[] = [];
      for (const col of columns) {
        if (has(col, i) && has(col, j)) {
          next.push(without(col, i), without(col, j));
          split.push(true, true);
        } else {
          next.push(col);
          split.push(false);
        }
      }
      // After each absorption no letter lies in another; a letter left whole is not inside a
      // copy (that would put it inside the letter the copy came from), so only copies can go.
      columns = absorb(next, split);
    }
  }
  return columns;
}

/**
 * The sweeping step: removes mean i from a letter when every mean sharing that letter also shares
 * another with i, and i keeps at least one letter; then drops empty and absorbed letters.
 */
function sweep(columns: MeanBits[], k: number): MeanBits[] {
  for (const col of columns) {
    for (const i of members(col, k)) {
      const others = columns.filter((c) => c !== col && has(c, i));
      if (others.length === 0) continue;
      let covered = true;
      for (let j = 0; j < k && covered; j++) if (j !== i && has(col, j)) covered = anyHolds(others, j);
      if (covered) col[i >>> 5] &= ~(1 << (i & 31));
    }
  }
  return absorb(columns.filter((c) => size(c) > 0));
}

/** Letter strings per mean: 'a' for the letter holding the highest mean, then by the next-highest mean each letter holds. */
function nameLetters(means: readonly number[], columns: readonly MeanBits[]): string[] {
  const k = means.length;
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
  return nameLetters(means, sweep(insertAndAbsorb(means.length, differs), means.length));
}

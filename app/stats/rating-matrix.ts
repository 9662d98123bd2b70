/**
 * The subjects × readers layout every agreement statistic starts from.
 *
 * A subject is what the readers scored: a case (one method, one question) or, pooled over
 * methods, a (case, method) image. `values[s * readers + r]` is reader r's score of subject s,
 * NaN where that reader gave none. Category counts per subject (how many readers put it in each
 * category) serve the statistics that need no reader identity (Fleiss, Krippendorff, Gwet,
 * percent agreement).
 */

export interface RatingMatrix {
  subjects: number;
  readers: number;
  /** Row-major subjects × readers; NaN marks a missing rating. */
  values: Float64Array;
}

export function ratingMatrix(rows: ReadonlyArray<ReadonlyArray<number | null>>): RatingMatrix {
  const subjects = rows.length;
  const readers = subjects > 0 ? rows[0].length : 0;
  const values = new Float64Array(subjects * readers);
  rows.forEach((row, s) => {
    if (row.length !== readers) {
      throw new RangeError(`subject ${s + 1} has ${row.length} rating slots, subject 1 has ${readers}: give one column per reader`);
    }
    row.forEach((v, r) => {
      values[s * readers + r] = v === null ? Number.NaN : v;
    });
  });
  return { subjects, readers, values };
}

/** Indices of the subjects every reader scored. */
export function completeSubjects(m: RatingMatrix): number[] {
  const out: number[] = [];
  for (let s = 0; s < m.subjects; s++) {
    let ok = true;
    for (let r = 0; r < m.readers && ok; r++) ok = !Number.isNaN(m.values[s * m.readers + r]);
    if (ok) out.push(s);
  }
  return out;
}

/** The complete subjects as plain rows, for the modules that take `number[][]`. */
export function completeRowsOf(m: RatingMatrix): number[][] {
  return completeSubjects(m).map((s) => Array.from(m.values.subarray(s * m.readers, (s + 1) * m.readers)));
}

/** Sorted distinct scores present in the matrix. */
export function observedCategories(m: RatingMatrix): number[] {
  const seen = new Set<number>();
  for (const v of m.values) if (!Number.isNaN(v)) seen.add(v);
  return [...seen].sort((a, b) => a - b);
}

export interface CategoryCounts {
  subjects: number;
  /** Category values, ascending. */
  categories: readonly number[];
  /** Row-major subjects × categories: readers who put subject s in category c. */
  counts: Float64Array;
  /** Ratings per subject. */
  rated: Float64Array;
}

/** Per-subject category counts. A score not among `categories` is an error. */
export function categoryCounts(m: RatingMatrix, categories: readonly number[]): CategoryCounts {
  const q = categories.length;
  const index = new Map(categories.map((c, j) => [c, j]));
  const counts = new Float64Array(m.subjects * q);
  const rated = new Float64Array(m.subjects);
  for (let s = 0; s < m.subjects; s++) {
    for (let r = 0; r < m.readers; r++) {
      const v = m.values[s * m.readers + r];
      if (Number.isNaN(v)) continue;
      const j = index.get(v);
      if (j === undefined) {
        throw new RangeError(`subject ${s + 1}, reader ${r + 1}: score ${v} is not one of the categories ${categories.join(', ')}`);
      }
      counts[s * q + j] += 1;
      rated[s] += 1;
    }
  }
  return { subjects: m.subjects, categories, counts, rated };
}

/**
 * Subjects with the same category counts, merged: `patterns` holds each distinct count vector once
 * and `patternOf[s]` names subject s's. A statistic that takes per-subject multiplicities gives the
 * same value on the patterns with summed multiplicities, at the cost of the (few) distinct patterns
 * rather than the (many) subjects; the bootstrap relies on this.
 */
export function distinctPatterns(cc: CategoryCounts): { patterns: CategoryCounts; patternOf: Int32Array } {
  const q = cc.categories.length;
  const index = new Map<string, number>();
  const patternOf = new Int32Array(cc.subjects);
  const firsts: number[] = [];
  for (let s = 0; s < cc.subjects; s++) {
    const key = cc.counts.subarray(s * q, (s + 1) * q).join(',');
    let p = index.get(key);
    if (p === undefined) {
      p = firsts.length;
      index.set(key, p);
      firsts.push(s);
    }
    patternOf[s] = p;
  }
  const counts = new Float64Array(firsts.length * q);
  const rated = new Float64Array(firsts.length);
  firsts.forEach((s, p) => {
    counts.set(cc.counts.subarray(s * q, (s + 1) * q), p * q);
    rated[p] = cc.rated[s];
  });
  return { patterns: { subjects: firsts.length, categories: cc.categories, counts, rated }, patternOf };
}

// Order statistics without a full sort: a median or a quantile of a few hundred
// thousand values in linear time on average, the value a sort would put there.

type Numbers = Float32Array | Float64Array;

/**
 * Moves the k-th smallest of a[lo..hi] to a[k], smaller ones before it and larger
 * after (Hoare's selection, "Algorithm 65: FIND", CACM 4:321, 1961, with a
 * median-of-three pivot): linear time on average, where a full sort of a
 * many-megapixel plane is not. The values must not hold NaN.
 */
export function selectKth(a: Numbers, k: number, lo = 0, hi = a.length - 1): void {
  while (hi > lo) {
    const mid = (lo + hi) >> 1;
    // Median of three as the pivot guards against sorted and constant runs.
    const x = a[lo], y = a[mid], z = a[hi];
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}

/**
 * The value a.sort()[k] would give (a typed array's sort puts NaN last), found by
 * selection; `a` is reordered. undefined when k is out of range, as the sorted
 * array's index would be.
 */
export function findKthSmallest(a: Numbers, k: number): number | undefined {
  const n = a.length;
  if (!(k >= 0 && k < n)) return undefined;
  // NaN compares false with everything: move it past the end of the numbers first.
  let end = n;
  for (let i = 0; i < end; ) {
    if (a[i] !== a[i]) {
      end--;
      const t = a[i];
      a[i] = a[end];
      a[end] = t;
    } else i++;
  }
  if (k >= end) return NaN;
  selectKth(a, k, 0, end - 1);
  return a[k];
}

// Selection of order statistics without sorting.

/**
 * Moves the k-th smallest (from 0) of a to a[k], smaller ones before it and larger
 * after (on a subarray, within that range) (Hoare's selection, "Algorithm 65: FIND", CACM 4:321, 1961, with a
 * median-of-three pivot): linear time on average, where a full sort of a
 * many-megapixel plane is not.
 */
export function selectKth(a: Float32Array, k: number): void {
  let lo = 0;
  let hi = a.length - 1;
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

/**
 * Holm's step-down adjustment (Holm 1979, Scand J Statist 6:65–70), the adjusted values of R's
 * `p.adjust(p, method = "holm")`: sort ascending, a_(i) = max over j ≤ i of min(1, (m − j + 1)·p_(j)).
 * It controls the family-wise error rate given only that each true null's value is no smaller than
 * uniform (so it may be applied to Benjamini–Hochberg q values, each at least its p value).
 * Missing values (null, NaN) are skipped and come back as null.
 * @example holm([0.01, 0.04, 0.03]) // → [0.03, 0.06, 0.06]
 */
export function holm(values: readonly (number | null | undefined)[]): (number | null)[] {
  const usable: { index: number; p: number }[] = [];
  values.forEach((p, index) => {
    if (typeof p === 'number' && !Number.isNaN(p)) usable.push({ index, p });
  });
  const out: (number | null)[] = values.map(() => null);
  const m = usable.length;
  usable.sort((a, b) => a.p - b.p || a.index - b.index);
  let running = 0;
  usable.forEach((item, i) => {
    running = Math.max(running, Math.min(1, (m - i) * item.p));
    out[item.index] = running;
  });
  return out;
}

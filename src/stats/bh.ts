/**
 * Benjamini–Hochberg adjusted p values ("q values" in this tool's reports).
 *
 * Method: step-up false discovery rate procedure of Benjamini & Hochberg (1995),
 * J R Stat Soc B 57:289–300. Variant: the adjusted values of R's
 * `p.adjust(p, method = "BH")`: sort p ascending, q_(i) = min over j ≥ i of
 * min(1, m·p_(j)/j), where m counts only the usable p values. Missing values (null,
 * undefined, NaN) are skipped: they do not count in m and come back as null, as R does
 * with `NA` (p.adjust's default n = length(p[!is.na(p)])).
 * @example
 * benjaminiHochberg([0.01, 0.04, 0.03, null]) // → [0.03, 0.04, 0.04, null]
 */
export function benjaminiHochberg(pValues: readonly (number | null | undefined)[]): (number | null)[] {
  const usable: { index: number; p: number }[] = [];
  pValues.forEach((p, index) => {
    if (typeof p === 'number' && !Number.isNaN(p)) usable.push({ index, p });
  });
  const out: (number | null)[] = pValues.map(() => null);
  const m = usable.length;
  usable.sort((a, b) => a.p - b.p || a.index - b.index);
  let running = Infinity;
  for (let rank = m; rank >= 1; rank--) {
    const item = usable[rank - 1]!; // rank runs from m down to 1
    running = Math.min(running, (m * item.p) / rank);
    out[item.index] = Math.min(1, running);
  }
  return out;
}

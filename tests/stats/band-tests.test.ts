import { describe, expect, it } from 'vitest';
import { beyondBandP, withinBandP } from '../../src/stats/band-tests.js';
import { holm } from '../../src/stats/holm.js';

// R's sleep data (R t.test(extra ~ group, data = sleep)): group 1 − group 2 = −1.58, Welch SE and df below [C].
const sleep = { estimate: -1.58, se: 0.849091016, df: 17.776473516178498 };

describe('beyondBandP (minimum-effect test against the band)', () => {
  it('adds the two one-sided t tests of R against the nearer and the farther edge (band −1 to 1, sleep data)', () => {
    // Computed once with R 4.2.2: t.test(g1, g2, mu = -1, alternative = "less")$p.value = 0.251680188559018
    // plus t.test(g1, g2, mu = 1, alternative = "less")$p.value = 0.00357066917366289 (Welch, sleep data).
    const p = beyondBandP(sleep.estimate, sleep.se, sleep.df, -1, 1)!;
    expect(p).toBeCloseTo(0.251680188559018 + 0.00357066917366289, 7);
  });

  it('matches R pt() on a constructed case', () => {
    // distance 0.5 from the centre, half-width 0.2, se 0.1, df 10: pt(3, 10, lower = FALSE) + pt(7, 10, lower = FALSE) (R 4.2.2).
    expect(beyondBandP(0.5, 0.1, 10, -0.2, 0.2)!).toBeCloseTo(0.00669040547269322, 12);
    expect(beyondBandP(-0.5, 0.1, 10, -0.2, 0.2)!).toBeCloseTo(0.00669040547269322, 12);
  });

  it('is the two-sided t test of no change when the band is a point', () => {
    // Two-sided Welch p of the sleep data, 0.079394 (computed from R's sleep data [C]).
    expect(beyondBandP(sleep.estimate, sleep.se, sleep.df, 0, 0)!).toBeCloseTo(0.079394, 5);
  });

  it('is about one half with the estimate on an edge, and null without se', () => {
    expect(beyondBandP(0.2, 0.01, 30, -0.2, 0.2)!).toBeCloseTo(0.5, 6);
    expect(beyondBandP(0.2, null, 30, -0.2, 0.2)).toBeNull();
    expect(beyondBandP(0.2, 0.1, null, -0.2, 0.2)).toBeNull();
  });
});

describe('withinBandP (two one-sided tests)', () => {
  it('is the larger of R’s two one-sided t tests against the edges (band −1 to 1, sleep data)', () => {
    // R 4.2.2: t.test(g1, g2, mu = -1, alternative = "greater")$p.value = 0.74831981144098181 (the larger);
    // t.test(g1, g2, mu = 1, alternative = "less")$p.value = 0.00357066917366289.
    expect(withinBandP(sleep.estimate, sleep.se, sleep.df, -1, 1)!).toBeCloseTo(0.74831981144098181, 7);
  });

  it('is below α exactly when the 1 − 2α interval lies inside the band', () => {
    // pt(4, 10, lower = FALSE) = 0.00125916631236835 (R 4.2.2).
    expect(withinBandP(0, 0.05, 10, -0.2, 0.2)!).toBeCloseTo(0.00125916631236835, 12);
    const t90 = 1.812461123; // qt(0.95, 10), R 4.2.2
    const edge = 0.2 - t90 * 0.05; // the 90% interval touches the upper edge
    expect(withinBandP(edge, 0.05, 10, -0.2, 0.2)!).toBeCloseTo(0.05, 8);
  });
});

describe('holm (step-down, as R p.adjust(method = "holm"))', () => {
  it('reproduces R on the Benjamini–Hochberg example p values (Benjamini & Hochberg 1995)', () => {
    const p = [0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528, 0.759, 1.0];
    // p.adjust(p, "holm"), R 4.2.2.
    const expected = [0.0015, 0.0056, 0.0247, 0.114, 0.2211, 0.278, 0.278, 0.278, 0.3213, 1, 1, 1, 1, 1, 1];
    holm(p).forEach((a, i) => expect(a!).toBeCloseTo(expected[i]!, 12));
  });

  it('keeps input order and skips missing values', () => {
    // p.adjust(c(0.01, 0.04, 0.03), "holm") = 0.03 0.06 0.06 (R 4.2.2).
    expect(holm([0.01, null, 0.04, 0.03])).toEqual([0.03, null, 0.06, 0.06]);
  });
});

/**
 * Changes to the methods that can change a call, newest first: shown on every methods page and in
 * the README, so that a reader of two reports built by different versions can tell why they differ.
 * Each note says what changed, why, and what it did to the synthetic demo study (data-demo/), the
 * tool's reference study, whose data did not change with it.
 */
export interface MethodChange {
  /** Tool version that brought the change. */
  version: string;
  title: string;
  /** What changed and why, in a few sentences. */
  what: string[];
  /** Calls of the demo study that changed, each with its reason. */
  demoCalls: string[];
}

export const METHOD_CHANGES: readonly MethodChange[] = [
  {
    version: '0.2.0',
    title: 'Calls bounded against the WT-like band; a variance per group; extrapolations and one-phase traces reach the call',
    what: [
      'Increased and decreased now need a minimum-effect test to show the effect beyond the nearer band edge (before: the estimate outside the band and a test of no change). Within WT range now needs two one-sided tests to show it inside the band (its 90% interval inside; before: the 95% interval). A truth inside the band was called abnormal in up to 34% of simulated studies before; now in at most 5% on the edge and about 0% well inside.',
      'The comparison lets the variant’s preparations scatter more or less than WT’s (a residual variance per group, REML, Satterthwaite degrees of freedom), and WT preparations of batches without the variant now inform WT’s variance. Intervals cover the truth 93–97% also when the variant scatters 2.5 times more than WT in unbalanced batches (86% before).',
      'Known controls are outside the Benjamini–Hochberg family of the test variants, and primary metrics are adjusted by Holm across the variant’s primary metrics, so a variant with no effect beyond any band is called abnormal overall with probability at most 5%.',
      'A preparation whose KM lies above the highest actin concentration no longer enters kcat or KM silently: such a variant gets no kcat or KM comparison, with the reason; kcat/KM, the initial slope, is a new metric that stays well determined. Likewise for force–pCa preparations whose pCa50 lies outside the measured range.',
      'A chase trace with one resolved phase now gives a slow fraction (placed against the WT rates of its batch, the other phase’s rate fixed at WT’s), instead of being left out of its preparation’s mean.',
      'Basal ATPase rate and passive tension are compared as differences in their own units (they lie near zero), not as ratios.',
    ],
    demoCalls: [
      'L236S: hypercontractile → indeterminate (evidence PS3 supporting → none). Its kcat (1.27×, 95% CI 1.18–1.37), velocity (1.28×) and pCa50 (+0.10) lie at their band edges: the estimates were outside the bands, but the data do not show the effects beyond them.',
      'L219A: hypocontractile → indeterminate. Fmax 0.66× (95% CI 0.57–0.77) and pCa50 −0.15 (−0.20 to −0.10) lie beyond their bands, but not clearly enough once the five primary metrics are adjusted together (q 0.54 and 0.56).',
      'F248H: hypocontractile → indeterminate. kcat 0.76× (0.62–0.93) and slow fraction +0.10 (+0.085 to +0.118) sit at their band edges.',
      'Q284K: mixed → hypercontractile (evidence none → PS3 supporting). Its velocity, 0.76× (0.73–0.80), is not shown beyond the 0.8 edge (q 0.48), so only its kcat change (hypercontractile) stands.',
      'A318T: mixed → hypercontractile (evidence none → PS3 supporting). Its Fmax, 0.61× (0.53–0.69), is not shown beyond the 0.8 edge after adjustment (q 0.12); its pCa50 (+0.20) is.',
      'Assay calls that became indeterminate for the same reason (effects at their band edges): S58I ATPase, motility and turnover; C122K, G181K and C262M ATPase; G181K and E91K motility; S166W motility; E333V and S166W force (the wider intervals of a variance per group no longer show Fmax inside its band).',
      'E333V: kcat and KM are no longer compared (KM above the highest actin concentration in its preparations); its kcat/KM is decreased.',
      'W133R: ATPase indeterminate → within WT range (kcat 1.11×, its 90% interval inside the band); turnover within WT range → indeterminate (its trace with phases too close to resolve now gives a slow fraction by the one-phase rule instead of being left out, which widens the interval).',
      'Calibration: with the pathogenic controls’ ATPase and motility calls now indeterminate, the ATPase calibration has no abnormal pathogenic control (PS3 supporting → none) and turnover likewise; the overall calibration is unchanged (PS3 supporting, BS3 supporting).',
    ],
  },
];

/** The README's section of method changes (between its method-changes markers), made from METHOD_CHANGES. */
export function methodChangesMarkdown(changes: readonly MethodChange[] = METHOD_CHANGES): string {
  let out =
    '## Changes to the methods\n\nChanges that can move a call, newest first (also on every methods page, from `src/analysis/method-changes.ts`), with what each did to the calls of the synthetic demo study, whose data did not change with it.\n';
  for (const c of changes) {
    out += `\n### Version ${c.version}: ${c.title}\n\n`;
    for (const w of c.what) out += `- ${w}\n`;
    out += '\nCalls of the demo study that changed:\n\n';
    for (const d of c.demoCalls) out += `- ${d}\n`;
  }
  return out;
}

/**
 * Checks of a loaded study that need its per-unit results, run by `check` and by `build` (both
 * as warnings, before any page is written). Pure.
 *
 *   units ──plausibility.ts──────────▶ implausible WT means and preparations (units that do not match the values)
 *         ──preparationsInBatches──▶ one preparation label in two batches of a variant (counted as independent)
 *   controls ──controlsCheck───────▶ too few known controls for any evidence level, even if all read as expected
 */
import { calibrate } from '../calibrate/oddspath.js';
import type { EvidenceLevel, MetricDef, UnitResult } from '../results/types.js';
import { MSG, issue } from '../study/messages.js';
import { MANIFEST_NAME, PREPARATION_COLUMN } from '../study/schemas.js';
import type { Issue, Study, Variant } from '../study/types.js';
import { plausibilityIssues } from './plausibility.js';

/**
 * One preparation label in several batches of one variant and assay: the paired model takes each
 * batch's unit as an independent preparation. One warning per variant and assay,
 * at the variant's first such unit in a later batch.
 */
export function preparationsInBatches(units: readonly UnitResult[], assays: ReadonlyArray<{ id: string; label: string }>, variants: readonly Variant[]): Issue[] {
  const issues: Issue[] = [];
  const byId = new Map(variants.map((v) => [v.id, v]));
  for (const a of assays) {
    // variant → preparation → its units in order of appearance
    const seen = new Map<string, Map<string, UnitResult[]>>();
    for (const u of units) {
      if (u.assay !== a.id || u.unit === '') continue;
      let preps = seen.get(u.variant);
      if (!preps) seen.set(u.variant, (preps = new Map()));
      const list = preps.get(u.unit);
      if (list) list.push(u);
      else preps.set(u.unit, [u]);
    }
    for (const [variant, preps] of seen) {
      const many = [...preps].filter(([, list]) => new Set(list.map((u) => u.batch)).size > 1);
      const [, list] = many[0] ?? [];
      if (!list) continue;
      // A preparation in two batches: its list holds a unit of another batch than its first.
      const second = list.find((u) => u.batch !== list[0]!.batch)!;
      const at = second.source[0] ?? { file: MANIFEST_NAME };
      issues.push(
        issue(
          MSG.preparationInBatches(a.label, byId.get(variant)?.label ?? variant, many.map(([preparation, list]) => ({ preparation, batches: [...new Set(list.map((u) => u.batch))] }))),
          { ...at, column: PREPARATION_COLUMN },
          { variants: [variant], group: `${a.id}\0${variant}` },
        ),
      );
    }
  }
  return issues;
}

const isPathogenicClass = (c: string) => c === 'pathogenic' || c === 'likely pathogenic';

/** Would this many controls, every one read as its class predicts, reach any evidence level? (src/calibrate/oddspath.ts) */
export function bestCaseLevels(pathogenic: number, benign: number, cap?: Study['thresholds']['evidenceCap']): { abnormal: EvidenceLevel; normal: EvidenceLevel } {
  const controls = [
    ...Array.from({ length: pathogenic }, (_, i) => ({ id: `p${i}`, knownClass: 'pathogenic' as const, readout: 'abnormal' as const })),
    ...Array.from({ length: benign }, (_, i) => ({ id: `b${i}`, knownClass: 'benign' as const, readout: 'normal' as const })),
  ];
  const c = calibrate('best case', controls, { cap });
  return { abnormal: c.levelAbnormal, normal: c.levelNormal };
}

/** The fewest controls to add (pathogenic, benign) so that the best case reaches a level; searched up to 30 of each. */
function controlsToAdd(pathogenic: number, benign: number, cap?: Study['thresholds']['evidenceCap']): [number, number] {
  for (let total = 1; total <= 60; total++) {
    for (let p = 0; p <= Math.min(total, 30); p++) {
      const b = total - p;
      if (b > 30) continue;
      const l = bestCaseLevels(pathogenic + p, benign + b, cap);
      if (l.abnormal !== 'none' || l.normal !== 'none') return [p, b];
    }
  }
  return [0, 0];
}

/**
 * Known controls measured per assay: when even a perfect readout of every one (pathogenic abnormal,
 * benign normal) reaches no evidence level, one warning per assay, at the manifest's variants, with
 * the fewest controls to add. A study without any known control gets one warning for the study.
 */
export function controlsCheck(study: Pick<Study, 'variants' | 'thresholds'>, units: readonly UnitResult[], assays: ReadonlyArray<{ id: string; label: string }>): Issue[] {
  const controls = study.variants.filter((v) => v.control && !v.isWT);
  const at = { file: MANIFEST_NAME, jsonPath: '/variants' };
  const cap = study.thresholds.evidenceCap;
  if (controls.length === 0) {
    const [p, b] = controlsToAdd(0, 0, cap);
    return [issue(MSG.tooFewControls('', 0, 0, p, b), at)];
  }
  const issues: Issue[] = [];
  for (const a of assays) {
    const measured = new Set(units.filter((u) => u.assay === a.id && !u.excluded).map((u) => u.variant));
    const mine = controls.filter((v) => measured.has(v.id));
    const nP = mine.filter((v) => isPathogenicClass(v.control!.class)).length;
    const nB = mine.length - nP;
    const best = bestCaseLevels(nP, nB, cap);
    if (best.abnormal !== 'none' || best.normal !== 'none') continue;
    const [p, b] = controlsToAdd(nP, nB, cap);
    issues.push(issue(MSG.tooFewControls(a.label, nP, nB, p, b), at, { group: a.id }));
  }
  return issues;
}

/** Every check that needs the per-unit results (see the module comment), in that order. */
export function studyChecks(study: Study, units: readonly UnitResult[], assays: ReadonlyArray<{ id: string; label: string; metrics: readonly MetricDef[] }>): Issue[] {
  return [...plausibilityIssues(units, assays, study.files, study.variants), ...preparationsInBatches(units, assays, study.variants), ...controlsCheck(study, units, assays)];
}

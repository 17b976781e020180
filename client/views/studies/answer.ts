/**
 * The sentences a study exists for, shared by the study page and its one-page summary: hours a day
 * saved by the default routing method against S-shape, and what each what-if saves or costs.
 * Pure: no Vue, no DOM.
 */
import { DEFAULT_ROUTING, type StudyDetail, type StudyResults, type StudyVariant } from '@shared/studies';
import { hours2, metres1, signed } from './format';

/** What the default routing method saves against S-shape on one plan, or null when either figure is missing. */
export function savingOverSShape(v: StudyVariant): { hoursPerDay: number; metres: number; pct: number | null } | null {
  const s = v.routing.find((x) => x.key === 's-shape');
  const d = v.routing.find((x) => x.key === DEFAULT_ROUTING);
  if (s?.hoursPerDay == null || d?.hoursPerDay == null || s.metres == null || d.metres == null) return null;
  const metres = s.metres - d.metres;
  return { hoursPerDay: s.hoursPerDay - d.hoursPerDay, metres, pct: s.metres > 0 ? (metres / s.metres) * 100 : null };
}

export function studyAnswerLines(r: StudyResults): string[] {
  const lines: string[] = [];
  for (const v of r.variants) {
    const saved = savingOverSShape(v);
    if (saved)
      lines.push(
        `${v.label}: switching from S-shape to the default method saves ${hours2(saved.hoursPerDay)} of picker time a day (${metres1(saved.metres)} less walking in the study's ${v.trips.length} trips).`,
      );
  }
  for (const w of r.whatIf) {
    if ((w.method === DEFAULT_ROUTING || w.method === 's-shape') && w.deltaHoursPerDay !== null) {
      const verb = w.deltaHoursPerDay <= 0 ? 'saves' : 'costs';
      lines.push(
        `${w.label}, routed by ${w.method === 's-shape' ? 'S-shape' : 'the default method'}: ${verb} ${hours2(Math.abs(w.deltaHoursPerDay))} of picker time a day (${signed(w.deltaMetres, 'm', 1)}, ${signed(w.deltaPct, '%')}).`,
      );
    }
  }
  return lines;
}

/** What "a day" means in the study's hours. */
export function studyDayNote(s: Pick<StudyDetail, 'inputs' | 'results'>): string {
  const w = s.inputs.work;
  const r = s.results;
  if (!r) return '';
  if (w.kind === 'generated')
    return `${w.wavesPerDay} waves like these (the study has ${w.orders.waves} of ${w.orders.ordersPerWave} orders: × ${r.dayScale.toFixed(3)})`;
  return `the recorded waves divided by the ${Math.round(1 / r.dayScale)} day(s) they cover`;
}

/** The question the study asked, in one sentence for a reader who did not set it up. */
export function studyQuestion(s: Pick<StudyDetail, 'inputs' | 'kind'>): string {
  const w = s.inputs.work;
  const whatIfs = s.inputs.whatIfs.map((x) => x.label);
  const tail = whatIfs.length ? `, and what ${whatIfs.length === 1 ? 'this change' : 'these changes'} to the floor plan would do: ${whatIfs.join('; ')}` : '';
  if (w.kind === 'generated') {
    const plan =
      w.plan.source === 'generated' ? 'a generated floor plan' : w.plan.source === 'plan' ? 'a chosen floor plan of the site' : "the site's active floor plan";
    return `How much picker walking would the routing methods save on ${plan}, for ${w.orders.waves} wave(s) of ${w.orders.ordersPerWave} orders of ${w.orders.linesMin}–${w.orders.linesMax} lines${tail}?`;
  }
  return `How much picker walking would the routing methods have saved on the site's recorded waves${tail}?`;
}

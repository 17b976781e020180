/**
 * Floor-plan import timings on this machine: the template, generated 20,000- and 50,400-bin
 * workbooks, and the refusal of a zip bomb. Wall time of `checkFloorPlanFile` includes starting the
 * worker; the phase split comes from its progress reports; the lag is the largest event-loop delay
 * on the calling thread meanwhile (perf_hooks.monitorEventLoopDelay).
 */
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { generateRectangularPlan } from '../../server/core/plan/generate';
import { buildFloorPlanTemplate, checkFloorPlanFile, floorPlanToWorkbook } from '../../server/floor-plans/import/index';
import { zipBombXlsx } from '../helpers/workbooks';

async function timeCheck(label: string, bytes: Uint8Array): Promise<void> {
  const lag = monitorEventLoopDelay({ resolution: 10 });
  const marks: Record<string, number> = {};
  const t0 = performance.now();
  lag.enable();
  const r = await checkFloorPlanFile(bytes, `${label}.xlsx`, {
    timeoutMs: 120_000,
    onProgress: (p) => {
      const key = `${p.phase}:${p.fraction === 0 ? 'start' : p.fraction === 1 ? 'end' : 'mid'}`;
      if (!(key in marks) || key.endsWith('end')) marks[key] = performance.now() - t0;
    },
  });
  const wall = performance.now() - t0;
  lag.disable();
  const parseMs = (marks['parsing:end'] ?? NaN) - (marks['parsing:start'] ?? NaN);
  const checkMs = (marks['checking:end'] ?? NaN) - (marks['parsing:end'] ?? NaN);
  console.log(
    `| ${label} | ${(bytes.length / 1024).toFixed(0)} KiB | ${r.stats.bins} | ${r.ok} | ${wall.toFixed(0)} | ${(marks['parsing:start'] ?? NaN).toFixed(0)} | ${parseMs.toFixed(0)} | ${checkMs.toFixed(0)} | ${(lag.max / 1e6).toFixed(1)} |`,
  );
}

export async function run(): Promise<void> {
  console.log('| file | size | bins | ok | wall ms | worker start ms | parse ms | check ms | max loop lag ms |');
  console.log('|---|---|---|---|---|---|---|---|---|');
  await timeCheck('template', buildFloorPlanTemplate());
  await timeCheck('template (again)', buildFloorPlanTemplate());
  const p20 = generateRectangularPlan({ aisles: 40, aisleLengthM: 60, aisleSpacingM: 3, baysPerAisle: 50, levels: 5 });
  await timeCheck('20k bins', floorPlanToWorkbook(p20));
  const p50 = generateRectangularPlan({
    aisles: 60,
    aisleLengthM: 80,
    aisleSpacingM: 3,
    baysPerAisle: 70,
    levels: 6,
    crossAisles: { front: true, back: true, middle: 1 },
  });
  await timeCheck('50k bins', floorPlanToWorkbook(p50));

  const bomb = zipBombXlsx(60);
  const t0 = performance.now();
  const r = await checkFloorPlanFile(bomb, 'bomb.xlsx');
  const ms = performance.now() - t0;
  console.log(`\nzip bomb: ${(bomb.length / 1024).toFixed(0)} KiB unpacking to 60 MiB → refused in ${ms.toFixed(2)} ms (${r.errors[0]?.message})`);
}

/**
 * A wave ends when every trip is done or cancelled (or the supervisor closes it); its report then
 * goes by mail to the site's supervisors, once (guarded by waves.report_mailed_at).
 */
import { XLSX_TYPE } from '../http/attachment';
import type { Knex } from 'knex';
import { siteMembersWithRole } from '../users/users.repository';
import type { Mailer } from '../mail/mailer';
import { buildWaveReport } from './report';
import { siteChanged } from './events';
import { claimWaveReport, completeRunningWave, getWaveRow, unfinishedTripCount } from './picking.repository';

/** Marks the wave completed when no trip remains open; mails the report. Returns the addresses mailed. */
export async function afterTripClosed(db: Knex, mailer: Mailer, waveId: number): Promise<string[]> {
  if ((await unfinishedTripCount(db, waveId)) > 0) return [];
  const changed = await completeRunningWave(db, waveId, new Date().toISOString());
  const wave = await getWaveRow(db, waveId);
  if (wave && changed) siteChanged(wave.site_id);
  return mailWaveReport(db, mailer, waveId);
}

/** Mails the wave report to the site's supervisors, at most once per wave. */
export async function mailWaveReport(db: Knex, mailer: Mailer, waveId: number): Promise<string[]> {
  if (!(await claimWaveReport(db, waveId, new Date().toISOString()))) return [];
  const wave = (await getWaveRow(db, waveId))!;
  const report = await buildWaveReport(db, waveId);
  const to = (await siteMembersWithRole(db, wave.site_id, 'supervisor')).map((u) => u.email).filter((e): e is string => !!e);
  for (const address of to) {
    await mailer.send({
      to: address,
      siteId: wave.site_id,
      subject: `Wave report: ${wave.name} (${report.summary.trips} trips, ${report.summary.shorts} short)`,
      text: report.text,
      attachments: [{ filename: report.filename, contentType: XLSX_TYPE, content: report.xlsx }],
    });
  }
  return to;
}

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
import { getWaveRow } from './picking.repository';

/** Marks the wave completed when no trip remains open; mails the report. Returns the addresses mailed. */
export async function afterTripClosed(db: Knex, mailer: Mailer, waveId: number): Promise<string[]> {
  const open = await db('trips').where({ wave_id: waveId }).whereNotIn('status', ['done', 'cancelled']).count<{ n: number }[]>({ n: '*' });
  if (Number(open[0]!.n) > 0) return [];
  const changed = await db('waves')
    .where({ id: waveId })
    .whereIn('status', ['released', 'picking'])
    .update({ status: 'completed', completed_at: new Date().toISOString() });
  const wave = await getWaveRow(db, waveId);
  if (wave && changed) siteChanged(wave.site_id);
  return mailWaveReport(db, mailer, waveId);
}

/** Mails the wave report to the site's supervisors, at most once per wave. */
export async function mailWaveReport(db: Knex, mailer: Mailer, waveId: number): Promise<string[]> {
  const claimed = await db('waves').where({ id: waveId }).whereNull('report_mailed_at').update({ report_mailed_at: new Date().toISOString() });
  if (claimed !== 1) return [];
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

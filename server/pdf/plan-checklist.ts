import type { JobDto } from '../../shared/schemas/jobs.js';
import { valueCheckFieldLabels, type Plan } from '../../shared/schemas/plan.js';
import { siteDateTime } from '../../shared/time.js';
import { PdfWriter, SAFETY_TEXT } from './document.js';

const roleWords: Record<string, string> = { supervisor: 'Supervisor', operator: 'Operator', signaller: 'Signaller', rigger: 'Rigger', viewer: 'Viewer' };

/**
 * The plan as a printable checklist: every stage, step and hold in order, with boxes to tick and
 * lines to sign. It is also the paper fallback when the site network fails.
 */
export async function planChecklistPdf(job: Pick<JobDto, 'name' | 'site' | 'craneFleetNumber' | 'timeZone'>, plan: Plan, version: number, printedAt: Date): Promise<Buffer> {
  const pdf = new PdfWriter(`Plan — ${job.name}`, `Holdline plan v${version} · ${job.name} · crane ${job.craneFleetNumber} · printed ${siteDateTime(printedAt, job.timeZone)} site time`);
  pdf.title(`${plan.kind === 'erection' ? 'Erection' : 'Dismantling'} plan, version ${version}`, `${job.name} — ${job.site} — crane ${job.craneFleetNumber}`);
  pdf.notice(SAFETY_TEXT);
  pdf.paragraph(`Paper fallback: tick each step when done; at each hold every named role signs before the supervisor releases it. Stop by radio and signal first. Write times as the site's clock (${job.timeZone}).`, { size: 9 });

  const titleOf = new Map(plan.stages.map((s, i) => [s.id, `${i + 1}. ${s.title}`]));
  plan.stages.forEach((stage, i) => {
    pdf.heading(`${i + 1}. ${stage.title}`);
    if (stage.summary) pdf.paragraph(stage.summary, { size: 9, color: '#3b434c' });
    if (stage.dependsOn.length) pdf.paragraph(`Starts after: ${stage.dependsOn.map((d) => titleOf.get(d) ?? d).join('; ')}`, { size: 8.5, color: '#3b434c' });
    for (const caution of stage.cautions) pdf.paragraph(`CAUTION: ${caution}`, { size: 9 });
    pdf.table(
      ['Done', 'Step', 'Who', 'Record'],
      [0.08, 0.56, 0.16, 0.2],
      stage.steps.map((step) => [
        '☐',
        step.text + (step.caution ? ` (Caution: ${step.caution})` : ''),
        step.allowedRoles.map((r) => roleWords[r]).join(', '),
        [step.records ? `${step.records.label}: ________${step.records.plannedSerial ? ` (planned ${step.records.plannedSerial})` : ''}` : '', step.requiresPhoto ? 'photo' : ''].filter(Boolean).join('; '),
      ]),
    );
    if (stage.hold) {
      const h = stage.hold;
      pdf.paragraph(`HOLD${h.mandatory ? ' (mandatory)' : ''}: ${h.title}`, { size: 10.5 });
      pdf.paragraph(h.instruction, { size: 9 });
      if (h.valueCheck) pdf.paragraph(`Read from the crane's controller: ${h.valueCheck.fields.map((f) => `${valueCheckFieldLabels[f.field]} ______`).join('   ')}`, { size: 9 });
      pdf.table(['Role', 'Name', 'Signature', 'Time'], [0.2, 0.3, 0.3, 0.2], [...h.requiredRoles.map((r) => [roleWords[r], '', '', '']), ['Released by supervisor', '', '', '']]);
    }
  });

  pdf.heading(plan.briefing.title);
  for (const section of plan.briefing.sections) {
    pdf.paragraph(section.heading, { size: 10.5 });
    for (const item of section.items) pdf.paragraph(`• ${item}`, { size: 9 });
  }
  return pdf.finish();
}

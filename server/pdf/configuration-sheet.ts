import { boomMakeupSvg } from '../../shared/drawings/boom-makeup.js';
import { groundPressureSvg } from '../../shared/drawings/ground-pressure.js';
import { reevingSvg } from '../../shared/drawings/reeving.js';
import { sitePlanSvg } from '../../shared/drawings/site-plan.js';
import { tonnesUp } from '../../shared/format.js';
import type { ArrangementData } from '../../shared/schemas/arrangement.js';
import { groundSourceLabels, type Configuration } from '../../shared/schemas/configuration.js';
import type { JobDto } from '../../shared/schemas/jobs.js';
import type { ConfigurationResults } from '../../shared/planner/types.js';
import { siteDateTime } from '../../shared/time.js';
import { PdfWriter, SAFETY_TEXT, svgAspect } from './document.js';

/** A figure's status in words, as the sheet and the record print it. */
export const statusWords = { pass: 'Pass', fail: 'FAIL', info: 'Info', unverified: 'UNVERIFIED', caution: 'CAUTION' } as const;

/** The configuration sheet: every input, every figure with its rule, overrides and the drawings. */
export async function configurationSheetPdf(job: JobDto, results: ConfigurationResults | null, arrangement: ArrangementData, printedAt: Date): Promise<Buffer> {
  const pdf = new PdfWriter(`Configuration sheet — ${job.name}`, `Holdline configuration sheet · ${job.name} · crane ${job.craneFleetNumber} · printed ${siteDateTime(printedAt, job.timeZone)} site time · log seq ${job.lastSeq}`);
  pdf.title('Configuration sheet', `${job.name} — ${job.site}`);
  pdf.facts([
    ['Crane', `${job.craneFleetNumber} — ${arrangement.manufacturer} ${arrangement.model}`],
    ['Job', `${job.kind === 'erection' ? 'Erection' : 'Dismantling'}, ${job.state}`],
    ['Log', `event ${job.lastSeq}, head ${job.headHash.slice(0, 16)}…`],
    ['Site time', `${job.timeZone}; every time on this sheet is the site's, with its offset from UTC`],
  ]);
  pdf.notice(SAFETY_TEXT);

  const c = job.configuration;
  if (!c || !results) {
    pdf.paragraph('No configuration has been planned for this job yet.');
    return pdf.finish();
  }

  pdf.heading('Configuration');
  pdf.facts(configurationFacts(c));

  pdf.heading('Boom make-up');
  const m = results.makeup;
  pdf.table(
    ['Position', 'Section', 'Length', 'From foot', 'Serial'],
    [0.12, 0.3, 0.16, 0.2, 0.22],
    m.sections.map((s) => [String(s.position), s.typeId, `${s.lengthM} m`, `${s.startM}–${s.endM} m`, s.serial ?? 'none at hand']),
  );
  pdf.paragraph(`Total section weight ${tonnesUp(m.totalSectionWeightKg)} t; ${m.pinCount.total} pins (${m.pinCount.jointPins} in joints, ${m.pinCount.guyLinePins} in guy lines). ${m.buildable ? 'Buildable from serviceable parts.' : `Not buildable: ${m.reasons.join('; ')}`}`);
  const boomSvg = boomMakeupSvg(m, { sectionTypes: arrangement.sectionTypes, widthPx: 960 });
  pdf.drawing(boomSvg, svgAspect(boomSvg));

  pdf.heading('Computed figures');
  for (const f of results.figures) {
    pdf.table([], [0.4, 0.42, 0.18], [[f.label, f.value, statusWords[f.status] + ((f.status === 'fail' || f.status === 'caution') && !f.overridable ? ', cannot be overridden' : '')]]);
    pdf.paragraph(`Rule: ${f.rule}${f.detail ? ` — ${f.detail}` : ''}`, { size: 7.5, color: '#3b434c' });
  }

  pdf.heading('Overrides');
  if (job.overrides.length === 0) pdf.paragraph('None.');
  else
    pdf.table(
      ['Figure', 'Reason', 'Asked by', 'Approved by'],
      [0.22, 0.4, 0.19, 0.19],
      job.overrides.map((o) => [o.figureLabel, o.reason, `${o.requestedBy.name}, ${siteDateTime(o.requestedAt, job.timeZone)}`, o.approvedBy ? `${o.approvedBy.name}, ${siteDateTime(o.approvedAt!, job.timeZone)}` : 'NOT APPROVED']),
    );

  for (const drawn of configurationDrawings(c, results, arrangement)) {
    pdf.heading(drawn.title);
    pdf.drawing(drawn.svg, svgAspect(drawn.svg));
  }
  return pdf.finish();
}

/** The configuration in label and value rows, as the sheet and the record print it. */
export function configurationFacts(c: Configuration): [string, string][] {
  return [
  ['Boom length', `${c.boomLengthM} m`],
  ['Main hook', `${c.mainHook.hookBlockId}, ${c.mainHook.parts} parts of line`],
  ['Auxiliary', c.auxiliary.enabled ? `auxiliary sheave with ${c.auxiliary.hookBlockId}` : 'not fitted'],
  ['Heaviest load', `${c.heaviestLoad.description}: ${c.heaviestLoad.loadT} t + rigging ${c.heaviestLoad.riggingT} t at ${c.heaviestLoad.radiusM} m radius`],
  ['Ground', `${c.ground.groundType || 'type not given'}, allowable ${c.ground.allowablePressureKpa} kPa — source: ${groundSourceLabels[c.ground.source.kind]}${c.ground.source.reference ? ` (${c.ground.source.reference})` : ''}${c.ground.source.designer ? `, designed by ${c.ground.source.designer}` : ''}`],
  ['Mats', c.mats.used ? `${c.mats.lengthM} × ${c.mats.widthM} × ${c.mats.thicknessM} m, ${c.mats.weightKg} kg each` : 'none'],
  ['Chart caution share', `${c.chartCautionPercent} % (above it a lift needs a second supervisor's approval; above 100 % never)`],
  ['Age of a wind reading', `at most ${c.weatherFreshMinutes} min when the boom goes up or comes down, or work resumes`],
  [
    'Assist crane lifts',
    c.assist.lifts.length
      ? c.assist.lifts
          .map((l) => `${l.label} ${l.liftT} t + rigging ${l.riggingT} t + its hook block ${l.hookBlockT} t + slings ${l.slingsT} t + shackles ${l.shacklesT} t + chart deductions ${l.deductionsT} t at ${l.radiusM} m`)
          .join('; ')
      : 'none',
  ],
  ...(c.assist.lifts.length || c.assist.tandem.releaseAngleDeg !== null
    ? ([
        [
          'Assist crane pads',
          c.assist.pads.loadT !== null && c.assist.pads.lengthM !== null && c.assist.pads.widthM !== null
            ? `${c.assist.pads.kind === 'track' ? 'track' : 'outrigger'} load ${c.assist.pads.loadT} t on ${c.assist.pads.lengthM} × ${c.assist.pads.widthM} m (${c.assist.pads.weightKg} kg)`
            : 'not entered',
        ],
      ] as [string, string][])
    : []),
  ...(c.assist.tandem.releaseAngleDeg !== null
    ? ([
        [
          'Tandem raise',
          `assist crane ${c.assist.tandem.alongFromTipM} m in from the tip, ${c.assist.tandem.sideM} m to the side; main crane takes the boom alone at ${c.assist.tandem.releaseAngleDeg}°`,
        ],
      ] as [string, string][])
    : []),
  [
    'Power lines',
    c.siteHazards.powerLines.length
      ? c.siteHazards.powerLines
          .map(
            (p) =>
              `${p.label}: ${p.voltageKv === null ? 'voltage unknown' : `${p.voltageKv} kV${p.voltageConfirmedByOwner ? ' (confirmed by the owner)' : ''}`} at ${p.distanceM} m` +
              `${p.encroachmentPreventionInPlace ? ', encroachment prevention in place' : ''}${p.assistDistanceM === null ? '' : `, assist crane ${p.assistDistanceM} m from it`}`,
          )
          .join('; ') + `. Allowances: hook, load and tag lines ${c.siteHazards.loadAndTagLineAllowanceM} m, sway ${c.siteHazards.swayAllowanceM} m`
      : 'none recorded',
  ],
  ['Buried services', c.siteHazards.buriedServices || 'none recorded'],
  ['Neighbours', c.siteHazards.neighbours || 'none recorded'],
  ];
}

/** The drawings of a configuration after the boom make-up: reeving, ground pressure, site plan. */
export function configurationDrawings(c: Configuration, results: ConfigurationResults, arrangement: ArrangementData): { title: string; svg: string }[] {
  const drawings: { title: string; svg: string }[] = [];
  if (results.reeving) {
    const r = results.reeving;
    drawings.push({ title: 'Reeving of the main hook', svg: reevingSvg({ parts: r.parts, sheaveCount: r.sheaveCount, hookBlockId: r.hookBlockId, leadLinePullKn: r.leadLinePullKn, leadSheaves: r.leadSheaves }) });
  }
  if (results.loadCases.length) {
    drawings.push({
      title: 'Ground pressure against slew angle',
      svg: groundPressureSvg(results.loadCases, c.ground.allowablePressureKpa, {
        trackLengthM: arrangement.tracks.lengthM,
        unverified: c.ground.source.kind === 'none',
        caution: results.figures.some((f) => f.key === 'ground.weights' && f.status === 'caution'),
      }),
    });
  }
  const gaugeM = results.makeup.arrangement?.raising.trackGaugeM ?? arrangement.tracks.gaugeOptionsM[0];
  drawings.push({
    title: 'Site plan: fall zone and power lines',
    svg: sitePlanSvg({ boomLengthM: c.boomLengthM, fallZoneRadiusM: results.fallZoneRadiusM, reachM: results.powerLines[0]?.reachM, powerLines: results.powerLines, trackLengthM: arrangement.tracks.lengthM, gaugeM, trackWidthM: arrangement.tracks.shoeWidthM }),
  });
  return drawings;
}

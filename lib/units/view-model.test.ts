import { describe, expect, it } from 'vitest';
import type { UnitRow } from '@/db/schema';
import { finding, SAFETY_CAUTION } from '@/lib/diagnosis/findings';
import { resolveLimits } from '@/lib/diagnosis/limits';
import type { KeTrend } from '@/lib/diagnosis/trend';
import { nameplateOfUnit } from '@/lib/setup/queries';
import { unitStateOf } from '@/lib/fleet/unit-state';
import type { UnitEmfView, UnitSeries, UnitView } from './queries';
import { emfPanelView, findingsView, kePanelView, nameplateView, seriesPanelView, unitHeadView } from './view-model';

const DAY = 86_400_000;
const NOW = Date.UTC(2026, 5, 10, 12);

const row: UnitRow = {
  key: 1,
  id: 'tu-01',
  siteId: 'test-site',
  name: 'Test 1',
  kind: 'wind',
  ratedKw: 10,
  ratedRpm: 300,
  maxRpm: 450,
  poles: 24,
  keVPerKrpm: 1000,
  keRefC: 20,
  magnet: 'ndfeb',
  magnetTempCoeffPctPerC: null,
  phaseOhm: 0.4,
  phaseMh: 3,
  powerCurve: null,
  cutInMs: 3,
  cutOutMs: 25,
  rotorDiameterM: 6.6,
  designHeadM: null,
  designFlowM3s: null,
  efficiency: null,
  diagnosis: null,
  createdAt: new Date(NOW - 100 * DAY),
  updatedAt: new Date(NOW - 100 * DAY),
};

function unitView(health: UnitView['health'], lastSampleMs: number | null = NOW - 2000): UnitView {
  return {
    site: { id: 'test-site', name: 'Test Site', timezone: 'Europe/London' },
    unit: row,
    nameplate: nameplateOfUnit(row),
    limits: resolveLimits(undefined),
    lastSampleMs,
    presence: 'online',
    health,
    state: unitStateOf({ health, lastSampleMs, nowMs: NOW }),
  };
}

const demagnetised: NonNullable<UnitView['health']> = {
  diagnosedAtMs: NOW - 60_000,
  windowFromMs: NOW - 6 * 3_600_000,
  windowToMs: NOW - 60_000,
  verdict: 'demagnetised',
  samplesUsed: 1234,
  keRatio: 0.912,
  keRatioLow: 0.905,
  keRatioHigh: 0.92,
  unbalancePct: 0.4,
  speedRatio: 1,
  findings: [finding('demagnetised', 'alarm', 'Ke is 8.8 % below nameplate.', { next: 'Measure the open-circuit voltage.', onSite: true }), finding('samples-filtered', 'info', 'Some samples left out.')],
  detail: {},
};

describe('the unit screen’s texts', () => {
  it('says what the head shows, and why a unit without a diagnosis is not judged', () => {
    const head = unitHeadView(unitView(undefined), NOW);
    expect(head).toMatchObject({ state: 'not-judged', summary: 'Wind, 10\u202fkW rated · last sample', lastSample: { atMs: NOW - 2000, ago: '2 s ago' } });
    expect(head.reason).toBeDefined();
    expect(unitHeadView(unitView(undefined, null), NOW).lastSample).toEqual({ atMs: null, ago: 'never' });
    expect(findingsView(unitView(undefined), NOW)).toEqual({
      kind: 'not-judged',
      state: 'not-judged',
      text: 'Not yet judged: the live diagnosis runs once the unit has sent samples; it needs at least 30 samples above 45\u202frpm.',
    });
  });

  it('splits each finding into its heading, observation, next steps and the one safety caution', () => {
    const f = findingsView(unitView(demagnetised), NOW);
    if (f.kind !== 'judged') throw new Error('expected a judged unit');
    expect(f).toMatchObject({ state: 'fault', diagnosedAgo: '60 s ago', samplesUsed: '1,234 samples used.', basis: 'Verdict rests on: corrected Ke low on all phases alike.' });
    expect(f.items[0]).toEqual({
      code: 'demagnetised',
      severity: 'alarm',
      icon: 'fault',
      heading: 'Alarm: Magnets weakened.',
      observation: 'Ke is 8.8 % below nameplate.',
      nextSteps: 'Measure the open-circuit voltage.',
      caution: SAFETY_CAUTION,
    });
    expect(f.items[1]).toMatchObject({ icon: 'not-judged', heading: expect.stringMatching(/^Note: /), nextSteps: undefined, caution: undefined });
    // A finding carries the caution, so none is repeated at the foot.
    expect(f.closingCaution).toBeUndefined();
    const quiet = findingsView(unitView({ ...demagnetised, findings: [finding('ke-low', 'warning', 'Ke is low.')] }), NOW);
    expect(quiet.kind === 'judged' && quiet.closingCaution).toBe(SAFETY_CAUTION);
  });

  it('captions the voltage chart with the window, the line’s temperature and the diagnosis’s ratio', () => {
    const emf: UnitEmfView = {
      points: [
        { ts: 1, rpm: 100, terminalV: 90, correctedV: 95 },
        { ts: 2, rpm: 20, terminalV: 20, correctedV: undefined },
      ],
      magnetC: 45,
      magnetSource: 'statorC',
      lineKeVPerKrpm: 970,
      speedFloorRpm: 45,
      fromMs: NOW - DAY,
      toMs: NOW,
      diagnosisWindow: true,
      samplesRead: 3000,
    };
    const panel = emfPanelView(unitView(demagnetised), emf);
    expect(panel.terminal).toEqual([
      { rpm: 100, v: 90 },
      { rpm: 20, v: 20 },
    ]);
    expect(panel.corrected).toEqual([{ rpm: 100, v: 95 }]);
    expect(panel.summary).toMatchObject({ kind: 'drawn', lead: '2 samples (of 3,000, evenly thinned) from', fromMs: NOW - DAY, toMs: NOW });
    const rest = panel.summary.kind === 'drawn' ? panel.summary.rest : '';
    expect(rest).toMatch(/^ \(the window of the latest diagnosis\)\. The solid line is the nameplate Ke moved to the magnet temperature of 45\u202f°C \(latest statorC\), 970\.0 V per 1000 rpm;/);
    expect(rest).toContain('the latest diagnosis puts them at 0.912 of it. Grey circles');
    expect(panel.table[0]).toEqual({ key: '0', speed: '20–30', samples: '1', terminal: '20', corrected: '–', nameplate: '24' });
    expect(emfPanelView(unitView(undefined), { ...emf, points: [] }).summary).toEqual({ kind: 'empty', text: 'No samples with voltage and speed in this window yet.' });
  });

  it('says how the Ke trend goes and when it is projected to cross the alarm line', () => {
    const days = [0, 1, 2].map((i) => ({ t: Date.UTC(2026, 4, 1 + i, 12), ke: 0.96 - i * 0.001, low: 0.95, high: 0.97, diagnoses: 24 }));
    const trend: KeTrend = {
      status: 'declining',
      days: 3,
      spanDays: 2,
      slopePctPerMonth: -1.234,
      slopeLowPctPerMonth: -2,
      slopeHighPctPerMonth: -0.5,
      level: 0.958,
      ewma: 0.958,
      baseline: 0.96,
      cusumAlarmMs: undefined,
      thresholdRatio: 0.95,
      crossingMs: Date.UTC(2026, 6, 1, 12),
      crossingEarliestMs: Date.UTC(2026, 5, 20, 12),
      crossingLatestMs: undefined,
    };
    const panel = kePanelView(unitView(demagnetised), { days, trend }, NOW);
    expect(panel.summary).toBe(
      '3 days with a Ke ratio since 1 May 2026; latest daily median 0.958. Trend: -1.23 % of nameplate a month (95 % interval -2.00 to -0.50), ' +
        'declining: projected to cross the alarm line 0.95 around 1 Jul 2026 (between 20 Jun 2026 and no date: the slowest rate in the interval never crosses). ' +
        "Warning line 0.97, alarm line 0.95; the grey band is the 95 % interval of each day's diagnoses.",
    );
    expect(panel.projection).toEqual({ fromT: days[2]!.t, level: 0.958, crossT: trend.crossingMs, earliestT: trend.crossingEarliestMs });
    // The window reaches the crossing (contract, section 7, `ke-trend`) and at least 14 days back.
    expect(panel).toMatchObject({ fromMs: days[0]!.t, toMs: trend.crossingMs });
    expect(panel.table.map((r) => r.day)).toEqual(['3 May 2026', '2 May 2026', '1 May 2026']);
    expect(panel.table[0]).toEqual({ key: String(days[2]!.t), day: '3 May 2026', ke: '0.958', interval: '0.950–0.970', diagnoses: '24' });
    expect(kePanelView(unitView(undefined), { days: [], trend: { ...trend, status: 'insufficient' } }, NOW).summary).toMatch(/^No Ke ratio yet/);
  });

  it('merges each chart’s series and states their weighted figures, and says where they came from', () => {
    const series: UnitSeries = {
      range: '7d',
      source: 'rollup-10m',
      fromMs: NOW - 7 * DAY,
      toMs: NOW,
      rowsRead: 1008,
      series: {
        rpm: [
          { t: NOW - 20 * 60_000, min: 90, max: 110, mean: 100, count: 60 },
          { t: NOW - 10 * 60_000, min: 190, max: 210, mean: 200, count: 20 },
        ],
      },
    };
    const panel = seriesPanelView(unitView(demagnetised), series, 'range: "9y" is not one of 1h, 6h, 1d, 7d, 30d, 1y; showing 6h');
    expect(panel.problem).toBe('range: "9y" is not one of 1h, 6h, 1d, 7d, 30d, 1y; showing 6h.');
    expect(panel.note).toBe(
      '7 days to now, from 10-minute rollups (frequency and each line and phase are kept only in raw samples, for the last day); 1,008 rollup rows read, shown as at most 1,200 points a line, the grey band the min–max of each point.',
    );
    expect(panel.ranges.find((r) => r.current)).toEqual({ key: '7d', href: '?range=7d#series-heading', title: '7 days', spoken: ' (7 days)', current: true });
    expect(panel.charts).toHaveLength(1);
    const [chart] = panel.charts;
    expect(chart).toMatchObject({ heading: 'Speed, rpm', unit: 'rpm', testId: 'series-rpm', band: true, lines: [{ key: 'rpm', label: 'Speed' }] });
    // The mean weights each bucket by its samples: (100·60 + 200·20) / 80 = 125.
    expect(chart!.summary).toBe('Speed: min 90\u202frpm, mean 125\u202frpm, max 210\u202frpm.');
    expect(chart!.rows[0]).toEqual({ t: NOW - 20 * 60_000, rpm: 100, band: [90, 110] });
    expect(seriesPanelView(unitView(undefined), { ...series, series: {} }, undefined).empty).toMatch(/^No readings in this range/);
  });

  it('lists the nameplate with units, the kind’s own fields and the limits in force', () => {
    const np = nameplateView(unitView(undefined));
    expect(np.editHref).toBe('/setup/units/test-site/tu-01');
    expect(np.rows.map((r) => r.term)).toEqual([
      'Kind',
      'Rated power',
      'Rated speed',
      'Overspeed limit',
      'Poles',
      'Ke',
      'Magnets',
      'Phase resistance',
      'Phase inductance',
      'Cut-in / cut-out',
      'Rotor diameter',
      'Diagnosis limits',
    ]);
    expect(np.rows.find((r) => r.term === 'Ke')?.detail).toBe('1,000.0 V (line, RMS) per 1000 rpm at 20\u202f°C');
    expect(np.rows.at(-1)?.detail).toBe('Ke warning 0.97, alarm 0.95; unbalance 2 %; speed reading ±2 %');
  });

  it('is plain data: it survives a trip through JSON', () => {
    const view = unitView(demagnetised);
    const vm = { head: unitHeadView(view, NOW), findings: findingsView(view, NOW), nameplate: nameplateView(view) };
    expect(JSON.parse(JSON.stringify(vm))).toEqual(vm);
  });
});

/**
 * The fleet list of the home page, read from this process's database.
 */
import { getDatabase } from '../../db/client';
import { getConfig } from '../config/env';
import { getComponentState } from '../server/registry';
import { getFleetOverview, getQuarantineSummary, type FleetOverviewSite, type QuarantineSummary } from './queries';

export interface FleetOverview {
  sites: FleetOverviewSite[];
  unitCount: number;
  onlineCount: number;
  attentionCount: number;
  /** Telemetry set aside as invalid, with the newest reasons. */
  quarantine: QuarantineSummary;
  /** How long raw samples and set-aside telemetry are kept (RETENTION_DAYS). */
  retentionDays: number;
  /** What the demo fleet is doing, or undefined when it is not part of this process. */
  demo?: { status: string; phase?: string };
}

/** Sites, units and their latest state, with counts for the summary line. */
export async function loadFleetOverview(): Promise<FleetOverview> {
  const { db } = await getDatabase();
  const [sites, quarantine] = await Promise.all([getFleetOverview({ db }), getQuarantineSummary({ db })]);
  const units = sites.flatMap((s) => s.units);
  // Only the demo fleet's state is shown here; the other parts are for /api/health.
  const demo = (await getComponentState('demo')) as { status: string; phase?: string } | undefined;
  return {
    sites,
    unitCount: units.length,
    onlineCount: units.filter((u) => u.presence === 'online').length,
    quarantine,
    retentionDays: getConfig().RETENTION_DAYS,
    attentionCount: units.filter((u) => u.verdict !== null && u.verdict !== 'healthy' && u.verdict !== 'insufficient-data').length,
    demo: demo ? { status: demo.status, phase: demo.phase } : undefined,
  };
}

/**
 * The report behind `GET /api/health`: the state of every part of this process.
 */
import { getComponentStates, type ComponentState } from './registry';

export interface HealthReport {
  status: 'ok' | 'degraded' | 'down';
  time: string;
  uptimeS: number;
  components: Record<string, ComponentState>;
}

/** Gathers the components' states; `down` if any is down, `degraded` if any is degraded. */
export async function getHealthReport(): Promise<HealthReport> {
  const components = await getComponentStates();
  const states = Object.values(components).map((c) => c.status);
  const status = states.includes('down') ? 'down' : states.includes('degraded') ? 'degraded' : 'ok';
  return { status, time: new Date().toISOString(), uptimeS: Math.round(process.uptime()), components };
}

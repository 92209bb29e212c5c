/**
 * The running parts of this process (database, broker, ingester, live
 * diagnosis, demo fleet) register here, so that `GET /api/health` can report
 * their state. Kept on globalThis because Next's bundled route code and the
 * custom server load separate copies of this module in one process.
 */
export interface ComponentState {
  /** `ok`, `degraded` (running but impaired), `down`, or `off` (not part of this process). */
  status: 'ok' | 'degraded' | 'down' | 'off';
  [key: string]: unknown;
}

export interface Component {
  state(): ComponentState | Promise<ComponentState>;
}

type GlobalWithRegistry = typeof globalThis & { __millraceComponents?: Map<string, Component> };

function registry(): Map<string, Component> {
  const g = globalThis as GlobalWithRegistry;
  g.__millraceComponents ??= new Map();
  return g.__millraceComponents;
}

/** Registers (or replaces) a component under `name`. */
export function registerComponent(name: string, component: Component): void {
  registry().set(name, component);
}

/** Removes a component. */
export function unregisterComponent(name: string): void {
  registry().delete(name);
}

/** The state of every registered component, by name. */
export async function getComponentStates(): Promise<Record<string, ComponentState>> {
  const out: Record<string, ComponentState> = {};
  for (const name of registry().keys()) {
    const state = await getComponentState(name);
    if (state) out[name] = state;
  }
  return out;
}

/** The state of one registered component, or undefined when none is registered under `name`. */
export async function getComponentState(name: string): Promise<ComponentState | undefined> {
  const component = registry().get(name);
  if (!component) return undefined;
  try {
    return await component.state();
  } catch (error) {
    return { status: 'down', error: (error as Error).message };
  }
}

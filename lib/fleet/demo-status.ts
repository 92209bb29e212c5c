/**
 * What the demo fleet is doing, as the fleet screen shows it. The host that
 * runs the simulator (lib/server/product.ts) hands its state in here; the
 * screen never reaches into the host. Kept on globalThis because Next's
 * bundled route code and the custom server load separate copies of this
 * module in one process.
 */
export interface DemoStatus {
  /** `ok` (running), `off`, or what the host's component reports. */
  readonly status: string;
  /** "backfilling history", "live", … */
  readonly phase?: string;
}

type GlobalWithDemo = typeof globalThis & { __millraceDemoStatus?: () => DemoStatus };

/** Called by the host: where the demo's state comes from (undefined: no demo in this process). */
export function provideDemoStatus(source: (() => DemoStatus) | undefined): void {
  const g = globalThis as GlobalWithDemo;
  if (source) g.__millraceDemoStatus = source;
  else delete g.__millraceDemoStatus;
}

/** The demo's state now, or undefined when this process runs no demo. */
export function currentDemoStatus(): DemoStatus | undefined {
  const state = (globalThis as GlobalWithDemo).__millraceDemoStatus?.();
  return state && { status: state.status, phase: state.phase };
}

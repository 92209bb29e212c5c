import { UNIT_STATES, UNIT_STATE_NAME, type UnitState } from '@/lib/fleet/unit-state';

/**
 * One shape per state, so a state reads without colour: an octagon for a
 * fault, a triangle for a warning, a hollow dashed ring for no data, a hollow
 * ring for not yet judged, a filled dot for healthy. The text beside it says it too.
 */
function StateShape({ state }: { state: UnitState }) {
  const common = { width: 14, height: 14, viewBox: '0 0 14 14', 'aria-hidden': true, focusable: false, className: 'state-shape' } as const;
  switch (state) {
    case 'fault':
      return (
        <svg {...common}>
          <polygon points="4.1,0.5 9.9,0.5 13.5,4.1 13.5,9.9 9.9,13.5 4.1,13.5 0.5,9.9 0.5,4.1" fill="currentColor" />
          <rect x="6.1" y="3" width="1.8" height="5" fill="#fff" />
          <rect x="6.1" y="9.2" width="1.8" height="1.8" fill="#fff" />
        </svg>
      );
    case 'warning':
      return (
        <svg {...common}>
          <polygon points="7,0.8 13.6,13 0.4,13" fill="currentColor" />
          <rect x="6.2" y="4.6" width="1.6" height="4.4" fill="#fff" />
          <rect x="6.2" y="10" width="1.6" height="1.6" fill="#fff" />
        </svg>
      );
    case 'no-data':
      return (
        <svg {...common}>
          <circle cx="7" cy="7" r="5.6" fill="none" stroke="currentColor" strokeWidth="1.8" strokeDasharray="2.6 2" />
        </svg>
      );
    case 'not-judged':
      return (
        <svg {...common}>
          <circle cx="7" cy="7" r="5.6" fill="none" stroke="currentColor" strokeWidth="1.8" />
          <rect x="6.1" y="6.1" width="1.8" height="1.8" fill="currentColor" />
        </svg>
      );
    case 'healthy':
      return (
        <svg {...common}>
          <circle cx="7" cy="7" r="5.5" fill="currentColor" />
          <polyline points="4,7.2 6.2,9.4 10.2,4.8" fill="none" stroke="#fff" strokeWidth="1.7" />
        </svg>
      );
  }
}

/**
 * A unit's state as text with a shape: never colour alone. `label` comes from
 * lib/fleet/unit-state.ts (the vocabulary of lib/diagnosis/vocabulary.ts).
 */
export function StateBadge({ state, label }: { state: UnitState; label: string }) {
  return (
    <span className={`state state-${state}`} data-state={state}>
      <StateShape state={state} />
      <span className="state-label">{label}</span>
    </span>
  );
}

/** The shape alone, for legends and counts where the state's name is written beside it. */
export function StateIcon({ state }: { state: UnitState }) {
  return (
    <span className={`state-icon state-${state}`}>
      <StateShape state={state} />
    </span>
  );
}

/** How many units are in each state, every state listed (a zero greyed), in the fixed order worst first. */
export function StateCounts({ counts, label }: { counts: Readonly<Record<UnitState, number>>; label: string }) {
  return (
    <ul className="state-counts" aria-label={label}>
      {UNIT_STATES.map((s) => (
        <li key={s} className={counts[s] === 0 ? 'zero' : undefined}>
          <StateIcon state={s} /> {UNIT_STATE_NAME[s]} <strong>{counts[s]}</strong>
        </li>
      ))}
    </ul>
  );
}

const LABELS: Record<string, string> = {
  healthy: 'healthy',
  demagnetised: 'magnets weakened',
  'shorted-turns': 'winding fault',
  'speed-sensor-fault': 'speed sensor suspect',
  'insufficient-data': 'not enough running data',
};

/** The latest diagnosis of a unit as a short labelled tag. */
export function VerdictBadge({ verdict }: { verdict: string | null }) {
  if (verdict === null) return <span className="tag tag-none">not diagnosed yet</span>;
  const tone = verdict === 'healthy' ? 'good' : verdict === 'insufficient-data' ? 'none' : 'fault';
  return (
    <span className={`tag tag-${tone}`} data-verdict={verdict}>
      {LABELS[verdict] ?? verdict}
    </span>
  );
}

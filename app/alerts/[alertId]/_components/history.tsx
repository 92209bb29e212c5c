/** An alert's history: every change, oldest first, with who made it and their words. */
import { LocalTime } from '@/app/_components/local-time';
import type { AlertScreen } from '@/lib/alerts/screen';
import styles from '@/app/alerts/alerts.module.css';

export function AlertHistory({ history, timeZone }: { history: AlertScreen['history']; timeZone: string }) {
  return (
    <section className="panel" aria-labelledby="history-heading">
      <h2 id="history-heading">History, oldest first</h2>
      {history.length === 0 ? (
        <p className="note">No change recorded yet.</p>
      ) : (
        <ol className={styles.history}>
          {history.map((e, i) => (
            <li key={i}>
              <LocalTime time={e.at} timeZone={timeZone} />
              <span className={styles.historyWhat}>{e.what}</span>
              <span>now {e.state}</span>
              <span className="muted">by {e.by}</span>
              {e.note ? <p className={styles.historyNote}>{e.note}</p> : null}
            </li>
          ))}
        </ol>
      )}
    </section>
  );
}

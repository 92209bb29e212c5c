'use client';
/**
 * Keeps a site or unit page up to date without a reload: one EventSource on
 * /api/live per page; on a change the page's server components are read
 * again (router.refresh, at most once a second). A button pauses and resumes
 * the updates; a status line says whether they flow; a polite live region
 * says in words when a unit's verdict changes.
 */
import { useRouter } from 'next/navigation';
import { useCallback, useEffect, useRef, useState } from 'react';
import { verdictLabel } from '@/lib/diagnosis/vocabulary';
import styles from './live-updates.module.css';

/** Least time between two refreshes of the page, ms. */
export const REFRESH_EVERY_MS = 1000;
/** Waits before opening a stream again after the server refused or dropped it, ms (doubling, up to the last). */
const RETRY_MS = [2000, 5000, 15000, 30000];

type Status = 'connecting' | 'live' | 'paused' | 'reconnecting';

const STATUS_TEXT: Record<Status, string> = {
  connecting: 'Connecting…',
  live: 'Live',
  paused: 'Paused: press the button again to resume',
  reconnecting: 'Reconnecting…',
};

interface DiagnosisData {
  unitId: string;
  verdict: string;
  previousVerdict?: string;
}

/** The sentence a screen reader hears when a unit's verdict changes. */
export function verdictAnnouncement({ unitId, verdict, previousVerdict }: DiagnosisData, unitNames?: Readonly<Record<string, string>>): string {
  const name = unitNames?.[unitId] ?? unitId;
  const now = verdictLabel(verdict);
  return previousVerdict === undefined ? `Unit ${name}: ${now}` : `Unit ${name}: ${now} (was ${verdictLabel(previousVerdict)})`;
}

export function LiveUpdates({ siteId, unitId, unitNames }: { siteId: string; unitId?: string; unitNames?: Readonly<Record<string, string>> }) {
  const router = useRouter();
  const [paused, setPaused] = useState(false);
  const [status, setStatus] = useState<Status>('connecting');
  const [announcement, setAnnouncement] = useState('');
  const lastRefresh = useRef(0);
  const pendingRefresh = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  const names = useRef(unitNames);
  useEffect(() => {
    names.current = unitNames;
  }, [unitNames]);

  const refreshSoon = useCallback(() => {
    if (pendingRefresh.current !== undefined) return;
    const wait = Math.max(0, lastRefresh.current + REFRESH_EVERY_MS - Date.now());
    pendingRefresh.current = setTimeout(() => {
      pendingRefresh.current = undefined;
      lastRefresh.current = Date.now();
      router.refresh();
    }, wait);
  }, [router]);

  useEffect(() => {
    if (paused) return;
    let source: EventSource | undefined;
    let retry: ReturnType<typeof setTimeout> | undefined;
    let failures = 0;
    let stopped = false;
    const query = new URLSearchParams({ site: siteId, ...(unitId ? { unit: unitId } : {}) });

    const connect = () => {
      if (stopped) return;
      const es = new EventSource(`/api/live?${query.toString()}`);
      source = es;
      es.addEventListener('ready', () => {
        failures = 0;
        setStatus('live');
      });
      es.addEventListener('samples', refreshSoon);
      es.addEventListener('alert', refreshSoon);
      es.addEventListener('diagnosis', (e) => {
        refreshSoon();
        try {
          const data = JSON.parse((e as MessageEvent<string>).data) as DiagnosisData;
          if (data.verdict !== data.previousVerdict) setAnnouncement(verdictAnnouncement(data, names.current));
        } catch {
          // a malformed event only costs its announcement; the page still refreshes
        }
      });
      // Changes were missed (the server restarted, or the page was away too long): read everything again.
      es.addEventListener('reset', () => {
        failures = 0;
        setStatus('live');
        lastRefresh.current = Date.now();
        router.refresh();
      });
      es.onerror = () => {
        setStatus('reconnecting');
        // The browser retries a dropped stream by itself; a refused one (404, 503) it gives up: we retry, slower each time.
        if (es.readyState === EventSource.CLOSED) {
          es.close();
          const wait = RETRY_MS[Math.min(failures, RETRY_MS.length - 1)]!;
          failures++;
          retry = setTimeout(connect, wait);
        }
      };
    };

    connect();
    return () => {
      stopped = true;
      source?.close();
      if (retry !== undefined) clearTimeout(retry);
    };
  }, [paused, siteId, unitId, refreshSoon, router]);

  useEffect(
    () => () => {
      if (pendingRefresh.current !== undefined) clearTimeout(pendingRefresh.current);
    },
    [],
  );

  const toggle = () => {
    if (paused) {
      // Back from a pause: catch up with whatever changed meanwhile.
      setStatus('connecting');
      refreshSoon();
    } else if (pendingRefresh.current !== undefined) {
      // Pausing holds the page as it is: a refresh still waiting for its turn is dropped (resuming catches up).
      clearTimeout(pendingRefresh.current);
      pendingRefresh.current = undefined;
    }
    setPaused(!paused);
  };
  const shown: Status = paused ? 'paused' : status;

  return (
    <div className={styles.bar} data-live-status={shown}>
      <span className={`${styles.status} ${styles[shown]}`} role="status">
        <span className={styles.dot} aria-hidden="true" />
        <span>
          <span className="visually-hidden">Live updates: </span>
          {STATUS_TEXT[shown]}
        </span>
      </span>
      <button type="button" className={styles.button} aria-pressed={paused} onClick={toggle}>
        Pause live updates
      </button>
      <div className="visually-hidden" aria-live="polite" aria-atomic="true" data-live-announcement="">
        {announcement}
      </div>
    </div>
  );
}

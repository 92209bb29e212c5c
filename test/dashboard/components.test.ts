import { describe, expect, it } from 'vitest';
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { ChartLegend } from '@/app/_components/chart-legend';
import { CHART_STYLE, seriesLook } from '@/app/_components/chart-style';
import { LocalTime } from '@/app/_components/local-time';
import { StateBadge } from '@/app/_components/state-badge';
import { UNIT_STATES } from '@/lib/fleet/unit-state';

describe('LocalTime', () => {
  it('shows the site’s time of day, with UTC in the title and as the description it shows on focus', () => {
    const html = renderToStaticMarkup(
      createElement(LocalTime, { time: new Date('2026-12-02T14:05:09Z'), timeZone: 'America/Halifax', now: new Date('2026-12-02T18:00:00Z') }),
    );
    expect(html).toMatch(/<time [^>]*>10:05<\/time>/);
    expect(html).toContain('title="2026-12-02 14:05:09 UTC"');
    expect(html).toContain('tabindex="0"');
    const described = /aria-describedby="([^"]+)"/.exec(html)?.[1];
    expect(described).toBeDefined();
    expect(html).toContain(`id="${described}" class="local-time-utc">2026-12-02 14:05:09 UTC<`);
    expect(html).toMatch(/datetime="2026-12-02T14:05:09.000Z"/i);
  });

  it('says never for a unit that never sent a sample', () => {
    expect(renderToStaticMarkup(createElement(LocalTime, { time: null, timeZone: 'Europe/London' }))).toContain('never');
  });
});

describe('StateBadge', () => {
  it('gives every state its text and a shape of its own, so colour is never the only cue', () => {
    const shapes = UNIT_STATES.map((state) => {
      const html = renderToStaticMarkup(createElement(StateBadge, { state, label: `label of ${state}` }));
      expect(html).toContain(`label of ${state}`);
      expect(html).toContain(`data-state="${state}"`);
      expect(html).toContain('aria-hidden="true"');
      return /<svg[^>]*>(.*)<\/svg>/.exec(html)?.[1];
    });
    expect(new Set(shapes).size).toBe(UNIT_STATES.length);
  });
});

describe('ChartLegend', () => {
  it('draws each series with the look chart-style gives it, telling lines apart by dash or shape as well as colour', () => {
    const items = [
      { look: CHART_STYLE.emfCorrected, label: 'EMF' },
      { look: CHART_STYLE.emfTerminal, label: 'Terminal' },
      { look: CHART_STYLE.emfAlarmLine, label: 'Alarm line' },
      { look: CHART_STYLE.keMedian, label: 'Daily median' },
      { look: CHART_STYLE.keInterval, label: 'Interval' },
      ...[0, 1, 2, 3].map((i) => ({ look: seriesLook(i), label: `Line ${i}` })),
    ];
    const html = renderToStaticMarkup(createElement(ChartLegend, { items }));
    expect(html).toMatch(/^<ul class="legend" aria-hidden="true">/);
    const swatches = [...html.matchAll(/<li>(<svg.*?<\/svg>)([^<]*)<\/li>/g)].map((m) => [m[1], m[2]]);
    expect(swatches.map((s) => s[1])).toEqual(items.map((i) => i.label));
    expect(swatches[0]![0]).toBe('<svg width="14" height="14" viewBox="0 0 14 14"><polygon points="7,1 13,13 1,13" fill="#1a5fd0"></polygon></svg>');
    expect(swatches[1]![0]).toBe('<svg width="14" height="14" viewBox="0 0 14 14"><circle cx="7" cy="7" r="5" fill="none" stroke="#545d63" stroke-width="1.5"></circle></svg>');
    expect(swatches[2]![0]).toContain(`stroke="${CHART_STYLE.emfAlarmLine.color}" stroke-width="1.5" stroke-dasharray="6 4"`);
    expect(swatches[3]![0]).toContain('<circle cx="14" cy="4" r="2.5" fill="#1b2429">');
    expect(swatches[4]![0]).toBe('<svg width="18" height="10" viewBox="0 0 18 10"><rect width="18" height="10" fill="#c9ccc6"></rect></svg>');
    // The time charts' four lines: each its own colour and its own dash (the first solid).
    const lines = swatches.slice(5).map((s) => s[0]);
    expect(new Set(lines.map((l) => /stroke="([^"]+)"/.exec(l!)?.[1])).size).toBe(4);
    expect(lines.map((l) => /stroke-dasharray="([^"]+)"/.exec(l!)?.[1])).toEqual([undefined, '6 3', '2 2', '8 3 2 3']);
  });
});

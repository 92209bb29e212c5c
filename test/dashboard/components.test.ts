import { describe, expect, it } from 'vitest';
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
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

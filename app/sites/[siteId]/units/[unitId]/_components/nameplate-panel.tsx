import type { NameplateView } from '@/lib/units/view-model';

/** The nameplate as entered and the diagnosis limits in force, with the way to Setup. */
export function NameplatePanel({ nameplate }: { nameplate: NameplateView }) {
  return (
    <section className="panel" aria-labelledby="nameplate-heading">
      <h2 id="nameplate-heading">Nameplate</h2>
      <dl className="kv" data-testid="nameplate">
        {nameplate.rows.flatMap((r) => [<dt key={`${r.term}-t`}>{r.term}</dt>, <dd key={`${r.term}-d`}>{r.detail}</dd>])}
      </dl>
      <p className="note">
        <a href={nameplate.editHref}>Edit this unit on Setup</a>
      </p>
    </section>
  );
}

'use client';
/**
 * The unit form: the contract's nameplate (shared/contract.md, section 2),
 * wind or hydro fields by kind, the power curve as "m/s kW" lines, and the
 * optional diagnosis limits. Checked on the server by the contract's schema;
 * each problem shows beside its field, the first invalid field takes focus,
 * and what was typed stays.
 */
import { useActionState, useEffect, useRef, useState } from 'react';
import { MAGNET_MATERIALS } from '@/lib/contract/nameplate';
import { problemsOf, type FormState } from '@/app/setup/form-state';
import { ErrorSummary, Field, fieldId, SelectField } from './field';
import styles from './form.module.css';

type Action = (state: FormState, data: FormData) => Promise<FormState>;

const MAGNET_LABEL: Record<(typeof MAGNET_MATERIALS)[number], string> = {
  ndfeb: 'NdFeB (neodymium)',
  smco: 'SmCo (samarium-cobalt)',
  ferrite: 'Ferrite',
};

/** Labels by field name, for the summary of problems. */
export const UNIT_FIELD_LABELS: Record<string, string> = {
  id: 'Unit id',
  siteId: 'Site',
  name: 'Name',
  kind: 'Kind',
  ratedKw: 'Rated power',
  ratedRpm: 'Rated speed',
  maxRpm: 'Overspeed limit',
  poles: 'Poles',
  keVPerKrpm: 'Ke',
  keRefC: 'Ke reference temperature',
  magnet: 'Magnet material',
  magnetTempCoeffPctPerC: 'Magnet temperature coefficient',
  phaseOhm: 'Phase resistance',
  phaseMh: 'Phase inductance',
  powerCurve: 'Power curve',
  cutInMs: 'Cut-in wind speed',
  cutOutMs: 'Cut-out wind speed',
  rotorDiameterM: 'Rotor diameter',
  designHeadM: 'Design head',
  designFlowM3s: 'Design flow',
  efficiency: 'Water-to-wire efficiency',
  'diagnosis.minSpeedFraction': 'Lowest speed used',
  'diagnosis.minSamples': 'Fewest samples',
  'diagnosis.minSpeedSpanFraction': 'Narrowest speed range',
  'diagnosis.speedRatioTolerance': 'Speed reading tolerance',
  'diagnosis.unbalanceAlarmPct': 'Unbalance limit',
  'diagnosis.keAlarmRatio': 'Ke ratio alarm line',
  'diagnosis.keWarnRatio': 'Ke ratio warning line',
  'diagnosis.maxSpeedRateFractionPerS': 'Fastest speed change used',
  'diagnosis.windowHours': 'Diagnosis window',
};

const LIMIT_HINTS: Record<string, string> = {
  'diagnosis.minSpeedFraction': 'fraction of rated speed, above 0 and below 1; default 0.15',
  'diagnosis.minSamples': 'whole number, 3 or more; default 30',
  'diagnosis.minSpeedSpanFraction': 'fraction of rated speed, above 0 and below 1; default 0.10',
  'diagnosis.speedRatioTolerance': 'fraction, above 0 and below 1; default 0.02',
  'diagnosis.unbalanceAlarmPct': '%, above 0 and below 100; default 2',
  'diagnosis.keAlarmRatio': 'above 0 and below 2; default 0.95',
  'diagnosis.keWarnRatio': 'above 0 and below 2; default 0.97',
  'diagnosis.maxSpeedRateFractionPerS': 'fraction of rated speed per second, at most 10; default 0.02',
  'diagnosis.windowHours': 'hours, at most 744; default from the server (6)',
};

type Values = Record<string, string>;
type Problems = Record<string, string>;
/** Makes one labelled field of the form with its value as typed and its problem. */
type MakeField = (name: string, label: string, hint?: string, more?: { optional?: boolean; wide?: boolean; number?: boolean }) => React.ReactNode;

function fieldMaker(v: Values, e: Problems): MakeField {
  return function makeField(name, label, hint, more = {}) {
    return (
      <Field
        key={name}
        name={name}
        label={label}
        hint={hint}
        error={e[name]}
        defaultValue={v[name] ?? ''}
        optional={more.optional}
        wide={more.wide}
        type={more.number === false ? 'text' : 'number-ish'}
      />
    );
  };
}

function IdentityFields({
  f,
  v,
  e,
  sites,
  editing,
  kind,
  onKind,
}: {
  f: MakeField;
  v: Values;
  e: Problems;
  sites: ReadonlyArray<{ id: string; name: string }>;
  editing?: { siteId: string; unitId: string };
  kind: 'wind' | 'hydro';
  onKind: (kind: 'wind' | 'hydro') => void;
}) {
  return (
    <fieldset className={styles.fieldset}>
      <legend>Identity</legend>
      {editing ? (
        <>
          <Field name="id" label="Unit id" defaultValue={editing.unitId} readOnly hint="devices publish under it: not changed here" />
          <Field name="siteId" label="Site" defaultValue={editing.siteId} readOnly />
        </>
      ) : (
        <>
          <Field name="id" label="Unit id" hint="1 to 64 of a-z, 0-9 and -, such as tarn-03; devices publish under it" error={e.id} defaultValue={v.id ?? ''} />
          <SelectField
            name="siteId"
            label="Site"
            error={e.siteId}
            defaultValue={v.siteId ?? sites[0]?.id}
            options={sites.map((s) => ({ value: s.id, label: `${s.name} (${s.id})` }))}
          />
        </>
      )}
      {f('name', 'Name', 'as people call it', { optional: true, number: false })}
      <SelectField
        name="kind"
        label="Kind"
        error={e.kind}
        defaultValue={kind}
        onChange={(value) => onKind(value === 'hydro' ? 'hydro' : 'wind')}
        options={[
          { value: 'wind', label: 'Wind' },
          { value: 'hydro', label: 'Hydro' },
        ]}
      />
    </fieldset>
  );
}

function NameplateFields({ f, v, e }: { f: MakeField; v: Values; e: Problems }) {
  return (
    <fieldset className={styles.fieldset}>
      <legend>Generator nameplate</legend>
      {f('ratedKw', 'Rated power', 'kW')}
      {f('ratedRpm', 'Rated speed', 'rev/min')}
      {f('maxRpm', 'Overspeed limit', 'rev/min, at least the rated speed')}
      {f('poles', 'Poles', 'number of magnetic poles, even (such as 18)')}
      {f('keVPerKrpm', 'Ke', 'open-circuit line-to-line V (RMS) per 1000 rev/min')}
      {f('keRefC', 'Ke reference temperature', '°C at which Ke was measured; default 20', { optional: true })}
      <SelectField
        name="magnet"
        label="Magnet material"
        error={e.magnet}
        defaultValue={v.magnet ?? 'ndfeb'}
        options={MAGNET_MATERIALS.map((m) => ({ value: m, label: MAGNET_LABEL[m] }))}
      />
      {f('magnetTempCoeffPctPerC', 'Magnet temperature coefficient', '% per °C, negative; blank: the material’s typical value', { optional: true })}
      {f('phaseOhm', 'Phase resistance', 'Ω per phase (star equivalent) at 20 °C')}
      {f('phaseMh', 'Phase inductance', 'mH per phase; blank or 0 if unknown', { optional: true })}
    </fieldset>
  );
}

function PowerCurveField({ v, e }: { v: Values; e: Problems }) {
  const id = fieldId('powerCurve');
  return (
    <div className={`${styles.field} ${styles.wide}`}>
      <label htmlFor={id} className={styles.label}>
        Power curve
      </label>
      <textarea
        id={id}
        name="powerCurve"
        className={`${styles.input} ${styles.textarea}`}
        defaultValue={v.powerCurve ?? ''}
        rows={8}
        spellCheck={false}
        aria-invalid={e.powerCurve ? true : undefined}
        aria-describedby={`${id}-hint${e.powerCurve ? ` ${id}-error` : ''}`}
      />
      {e.powerCurve ? (
        <span id={`${id}-error`} className={styles.error}>
          {e.powerCurve}
        </span>
      ) : null}
      <span id={`${id}-hint`} className={styles.hint}>
        One point a line: wind speed in m/s, then power in kW at 1.225 kg/m³, such as “5 1.2”. At least two points, wind speed rising.
      </span>
    </div>
  );
}

function TurbineFields({ f, v, e, kind }: { f: MakeField; v: Values; e: Problems; kind: 'wind' | 'hydro' }) {
  return (
    <>
      <fieldset className={styles.fieldset} hidden={kind !== 'wind'} disabled={kind !== 'wind'}>
        <legend>Wind turbine</legend>
        {f('cutInMs', 'Cut-in wind speed', 'm/s')}
        {f('cutOutMs', 'Cut-out wind speed', 'm/s, above cut-in')}
        {f('rotorDiameterM', 'Rotor diameter', 'm')}
        <PowerCurveField v={v} e={e} />
      </fieldset>

      <fieldset className={styles.fieldset} hidden={kind !== 'hydro'} disabled={kind !== 'hydro'}>
        <legend>Hydro turbine</legend>
        {f('designHeadM', 'Design head', 'm, net')}
        {f('designFlowM3s', 'Design flow', 'm³/s')}
        {f('efficiency', 'Water-to-wire efficiency', 'fraction above 0, at most 1 (such as 0.72)')}
      </fieldset>
    </>
  );
}

/** The per-unit limits, in the order a person tunes them. */
const LIMIT_ORDER = [
  'diagnosis.keWarnRatio',
  'diagnosis.keAlarmRatio',
  'diagnosis.unbalanceAlarmPct',
  'diagnosis.speedRatioTolerance',
  'diagnosis.minSpeedFraction',
  'diagnosis.minSpeedSpanFraction',
  'diagnosis.minSamples',
  'diagnosis.maxSpeedRateFractionPerS',
  'diagnosis.windowHours',
] as const;

function LimitFields({ f }: { f: MakeField }) {
  return (
    <fieldset className={styles.fieldset}>
      <legend>Diagnosis limits (optional)</legend>
      <p className={styles.fieldsetNote}>Leave blank to use the defaults. They are common practice, not from a standard; change them only with a reason for this machine.</p>
      {LIMIT_ORDER.map((name) => f(name, UNIT_FIELD_LABELS[name]!, LIMIT_HINTS[name], { optional: true }))}
    </fieldset>
  );
}

export function UnitForm({
  action,
  initial,
  sites,
  editing,
  submitLabel,
}: {
  action: Action;
  initial: FormState;
  /** Sites to choose from (a new unit). */
  sites: ReadonlyArray<{ id: string; name: string }>;
  /** A unit being edited: its id and site are shown, not changed. */
  editing?: { siteId: string; unitId: string };
  submitLabel: string;
}) {
  const [state, formAction, pending] = useActionState(action, initial);
  const [kind, setKind] = useState<'wind' | 'hydro'>(initial.values?.kind === 'hydro' ? 'hydro' : 'wind');
  const formRef = useRef<HTMLFormElement>(null);
  const v = state.values ?? {};
  const e = problemsOf(state);

  useEffect(() => {
    if (state.submitted === 0) return;
    const first = formRef.current?.querySelector<HTMLElement>('[aria-invalid="true"]');
    first?.focus();
  }, [state]);

  const f = fieldMaker(v, e);
  return (
    <form ref={formRef} action={formAction} className={styles.form} key={state.submitted} noValidate>
      <ErrorSummary errors={e} labels={UNIT_FIELD_LABELS} />
      <IdentityFields f={f} v={v} e={e} sites={sites} editing={editing} kind={kind} onKind={setKind} />
      <NameplateFields f={f} v={v} e={e} />
      <TurbineFields f={f} v={v} e={e} kind={kind} />
      <LimitFields f={f} />

      <div className={styles.actions}>
        <button type="submit" className={styles.primary} disabled={pending}>
          {pending ? 'Saving…' : submitLabel}
        </button>
        <a href={editing ? `/setup/sites/${editing.siteId}` : '/setup'}>Cancel</a>
      </div>
    </form>
  );
}

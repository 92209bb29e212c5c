/**
 * The setup forms' fields, and their values turned into the contract's
 * shapes (a nameplate, a site) by the contract's own zod schemas, with each
 * problem keyed by the form field it belongs to, in words a person can act
 * on. Pure: the server actions and their tests call it.
 */
import { z } from 'zod';
import { describeValue } from '@/lib/contract/telemetry';
import { DEFAULT_LIMITS } from '@/lib/diagnosis/limits';
import { diagnosisLimitsSchema, nameplateSchema, siteSchema, type Nameplate, type Site } from '@/lib/contract/nameplate';

/** What a form sent, field by field, as typed. */
export type FormValues = Record<string, string>;
/** Problems by form field name; `_form` for one that belongs to no field. */
export type FieldErrors = Record<string, string>;

export type FormResult<T> = { ok: true; value: T } | { ok: false; fieldErrors: FieldErrors };

/** Number fields of the nameplate, in form order. */
export const NAMEPLATE_NUMBER_FIELDS = [
  'ratedKw',
  'ratedRpm',
  'maxRpm',
  'poles',
  'keVPerKrpm',
  'keRefC',
  'magnetTempCoeffPctPerC',
  'phaseOhm',
  'phaseMh',
] as const;
export const WIND_NUMBER_FIELDS = ['cutInMs', 'cutOutMs', 'rotorDiameterM'] as const;
export const HYDRO_NUMBER_FIELDS = ['designHeadM', 'designFlowM3s', 'efficiency'] as const;
/** The per-unit diagnosis limits (all optional), as form fields `diagnosis.<name>`. */
export const DIAGNOSIS_LIMIT_FIELDS = Object.keys(diagnosisLimitsSchema.shape) as Array<keyof typeof diagnosisLimitsSchema.shape>;

export { formValues } from '@/lib/request/form-values';

/**
 * A number as typed: blank is absent, a number is a number, anything else
 * stays text so that the schema names it ("expected a number of poles, got "six"").
 */
function numberOrText(raw: string | undefined): number | string | undefined {
  const text = (raw ?? '').trim();
  if (text === '') return undefined;
  const n = Number(text.replace(',', '.'));
  return Number.isFinite(n) ? n : text;
}

/**
 * Reads a power curve typed as one "wind speed, power" pair a line
 * ("3 0.2", "3, 0.2" or "3;0.2"): blank lines are skipped, a bad line is
 * named by its number.
 * @example parsePowerCurve('3 0.2\n11 6') // { ok: true, points: [{ ms: 3, kw: 0.2 }, { ms: 11, kw: 6 }] }
 */
export function parsePowerCurve(text: string): { ok: true; points: Array<{ ms: number; kw: number }> } | { ok: false; problem: string } {
  const points: Array<{ ms: number; kw: number }> = [];
  const lines = text.split(/\r?\n/);
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i]!.trim();
    if (line === '') continue;
    const parts = line.split(/[\s;,]+/).filter(Boolean);
    const numbers = parts.map(Number);
    if (parts.length !== 2 || numbers.some((n) => !Number.isFinite(n))) {
      return { ok: false, problem: `line ${i + 1}: expected two numbers, wind speed in m/s and power in kW (such as "5 1.2"), got ${describeValue(line)}` };
    }
    points.push({ ms: numbers[0]!, kw: numbers[1]! });
  }
  return { ok: true, points };
}

/** A power curve as the form shows it: one "m/s kW" pair a line. */
export function powerCurveText(points: ReadonlyArray<{ ms: number; kw: number }> | undefined): string {
  return (points ?? []).map((p) => `${p.ms} ${p.kw}`).join('\n');
}

/** The line of the power-curve text that holds point `index` (blank lines count as lines). */
function powerCurveLine(text: string, index: number): number {
  let seen = -1;
  const lines = text.split(/\r?\n/);
  for (let i = 0; i < lines.length; i++) {
    if (lines[i]!.trim() === '') continue;
    seen++;
    if (seen === index) return i + 1;
  }
  return index + 1;
}

/** The form field a nameplate issue belongs to, and its message there. */
function fieldOfIssue(issue: z.core.$ZodIssue, values: FormValues): [string, string] {
  const [head, ...rest] = issue.path;
  if (head === 'powerCurve') {
    if (typeof rest[0] === 'number') {
      const field = rest[1] === 'kw' ? 'power' : 'wind speed';
      return ['powerCurve', `line ${powerCurveLine(values.powerCurve ?? '', rest[0])}: ${field} ${issue.message}`];
    }
    if (issue.code === 'too_small') return ['powerCurve', 'needs at least two points, one a line'];
    return ['powerCurve', issue.message];
  }
  if (head === 'diagnosis' && rest.length > 0) return [`diagnosis.${String(rest[0])}`, issue.message];
  if (head === undefined) return ['_form', issue.message];
  return [String(head), issue.message];
}

/**
 * The nameplate a unit form describes, checked by the contract's schema.
 * `fixed` holds the id and site of a unit being edited (not editable: devices
 * publish under them).
 */
export function nameplateFromForm(values: FormValues, fixed?: { id: string; siteId: string }): FormResult<Nameplate> {
  const kind = values.kind;
  const raw: Record<string, unknown> = {
    id: fixed?.id ?? (values.id ?? '').trim(),
    siteId: fixed?.siteId ?? (values.siteId ?? '').trim(),
    kind,
    magnet: values.magnet,
  };
  const name = (values.name ?? '').trim();
  if (name !== '') raw.name = name;
  const numberFields: readonly string[] = [
    ...NAMEPLATE_NUMBER_FIELDS,
    ...(kind === 'hydro' ? HYDRO_NUMBER_FIELDS : kind === 'wind' ? WIND_NUMBER_FIELDS : []),
  ];
  for (const field of numberFields) {
    const v = numberOrText(values[field]);
    if (v !== undefined) raw[field] = v;
  }
  const errors: FieldErrors = {};
  if (kind === 'wind' && (values.powerCurve ?? '').trim() !== '') {
    const curve = parsePowerCurve(values.powerCurve ?? '');
    if (curve.ok) raw.powerCurve = curve.points;
    else errors.powerCurve = curve.problem;
  }
  const limits: Record<string, unknown> = {};
  for (const field of DIAGNOSIS_LIMIT_FIELDS) {
    const v = numberOrText(values[`diagnosis.${field}`]);
    if (v !== undefined) limits[field] = v;
  }
  if (Object.keys(limits).length > 0) raw.diagnosis = limits;

  const warn = typeof limits.keWarnRatio === 'number' ? limits.keWarnRatio : DEFAULT_LIMITS.keWarnRatio;
  const alarm = typeof limits.keAlarmRatio === 'number' ? limits.keAlarmRatio : DEFAULT_LIMITS.keAlarmRatio;
  if (warn < alarm) {
    // The diagnosis would refuse these limits and fall back to the defaults (lib/diagnosis/limits.ts).
    errors[typeof limits.keWarnRatio === 'number' ? 'diagnosis.keWarnRatio' : 'diagnosis.keAlarmRatio'] =
      `the warning line (${warn}) must not be below the alarm line (${alarm})`;
  }

  const parsed = nameplateSchema.safeParse(raw);
  if (parsed.success && Object.keys(errors).length === 0) return { ok: true, value: parsed.data };
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const [field, message] = fieldOfIssue(issue, values);
      errors[field] ??= message;
    }
  }
  return { ok: false, fieldErrors: errors };
}

/** The site a site form describes, checked by the contract's schema. */
export function siteFromForm(values: FormValues, fixedId?: string): FormResult<Site> {
  const parsed = siteSchema.safeParse({
    id: fixedId ?? (values.id ?? '').trim(),
    name: values.name ?? '',
    timezone: (values.timezone ?? '').trim(),
  });
  if (parsed.success) return { ok: true, value: parsed.data };
  const errors: FieldErrors = {};
  for (const issue of parsed.error.issues) errors[String(issue.path[0] ?? '_form')] ??= issue.message;
  return { ok: false, fieldErrors: errors };
}

/** A nameplate as the unit form's values (for editing). */
export function formOfNameplate(np: Nameplate): FormValues {
  const values: FormValues = { id: np.id, siteId: np.siteId, name: np.name ?? '', kind: np.kind, magnet: np.magnet };
  const all = [...NAMEPLATE_NUMBER_FIELDS, ...WIND_NUMBER_FIELDS, ...HYDRO_NUMBER_FIELDS] as const;
  for (const field of all) {
    const v = np[field];
    values[field] = v === undefined ? '' : String(v);
  }
  values.powerCurve = powerCurveText(np.powerCurve);
  for (const field of DIAGNOSIS_LIMIT_FIELDS) {
    const v = np.diagnosis?.[field];
    values[`diagnosis.${field}`] = v === undefined ? '' : String(v);
  }
  return values;
}

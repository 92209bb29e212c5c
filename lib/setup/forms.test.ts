import { describe, expect, it } from 'vitest';
import { formOfNameplate, nameplateFromForm, parsePowerCurve, siteFromForm, type FormValues } from './forms';

const wind: FormValues = {
  id: 'tarn-03',
  siteId: 'tarn-edge',
  name: '',
  kind: 'wind',
  ratedKw: '6',
  ratedRpm: '280',
  maxRpm: '420',
  poles: '18',
  keVPerKrpm: '1100',
  keRefC: '20',
  magnet: 'ndfeb',
  magnetTempCoeffPctPerC: '',
  phaseOhm: '0.55',
  phaseMh: '4.2',
  cutInMs: '3',
  cutOutMs: '24',
  rotorDiameterM: '5.5',
  powerCurve: '3 0.1\n\n11 6\n',
  // hydro fields typed before the kind changed are not part of a wind unit
  designHeadM: 'x',
};

describe('unit form to nameplate (the contract schema decides)', () => {
  it('takes a good wind unit, blank optional fields left out', () => {
    const r = nameplateFromForm(wind);
    expect(r).toEqual({
      ok: true,
      value: expect.objectContaining({ id: 'tarn-03', poles: 18, powerCurve: [{ ms: 3, kw: 0.1 }, { ms: 11, kw: 6 }], keRefC: 20, phaseMh: 4.2 }),
    });
    if (r.ok) {
      expect(r.value.name).toBeUndefined();
      expect(r.value.designHeadM).toBeUndefined();
      expect(r.value.diagnosis).toBeUndefined();
    }
  });

  it('puts the message of odd poles beside the poles field, in the contract words', () => {
    expect(nameplateFromForm({ ...wind, poles: '7' })).toEqual({ ok: false, fieldErrors: { poles: 'must be an even number, got 7' } });
  });

  it('quotes what was typed where a number was expected', () => {
    const r = nameplateFromForm({ ...wind, ratedKw: 'six' });
    expect(!r.ok && r.fieldErrors.ratedKw).toBe('expected a number of kW, got "six"');
  });

  it('names the line of the power curve that is wrong, counting blank lines', () => {
    const bad = nameplateFromForm({ ...wind, powerCurve: '3 0.1\n\n5\n11 6' });
    expect(!bad.ok && bad.fieldErrors.powerCurve).toBe('line 3: expected two numbers, wind speed in m/s and power in kW (such as "5 1.2"), got "5"');
    const falling = nameplateFromForm({ ...wind, powerCurve: '3 0.1\n\n11 6\n9 7' });
    expect(!falling.ok && falling.fieldErrors.powerCurve).toBe('line 4: wind speed must rise from point to point, got 9 after 11');
    const missing = nameplateFromForm({ ...wind, powerCurve: '' });
    expect(!missing.ok && missing.fieldErrors.powerCurve).toBe('is required for a wind unit');
  });

  it('needs the hydro fields for a hydro unit and not the wind ones', () => {
    const r = nameplateFromForm({ ...wind, kind: 'hydro', designHeadM: '24', designFlowM3s: '', efficiency: '1.2' });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.fieldErrors).toEqual({ designFlowM3s: 'is required for a hydro unit', efficiency: 'must be above 0 and at most 1, got 1.2' });
  });

  it('takes optional diagnosis limits, and refuses a warning line below the alarm line', () => {
    const r = nameplateFromForm({ ...wind, 'diagnosis.keAlarmRatio': '0.93' });
    expect(r.ok && r.value.diagnosis).toEqual({ keAlarmRatio: 0.93 });
    const crossed = nameplateFromForm({ ...wind, 'diagnosis.keWarnRatio': '0.9' });
    expect(!crossed.ok && crossed.fieldErrors['diagnosis.keWarnRatio']).toBe('the warning line (0.9) must not be below the alarm line (0.95)');
    const outside = nameplateFromForm({ ...wind, 'diagnosis.unbalanceAlarmPct': '150' });
    expect(!outside.ok && Object.keys(outside.fieldErrors)).toEqual(['diagnosis.unbalanceAlarmPct']);
  });

  it('keeps the id and site of a unit being edited, whatever the form says', () => {
    const r = nameplateFromForm({ ...wind, id: 'other', siteId: 'elsewhere' }, { id: 'tarn-03', siteId: 'tarn-edge' });
    expect(r.ok && [r.value.id, r.value.siteId]).toEqual(['tarn-03', 'tarn-edge']);
  });

  it('round-trips a nameplate through the form', () => {
    const r = nameplateFromForm({ ...wind, 'diagnosis.windowHours': '12' });
    if (!r.ok) throw new Error('expected a valid nameplate');
    expect(nameplateFromForm(formOfNameplate(r.value))).toEqual(r);
  });
});

describe('power curve text', () => {
  it('reads spaces, commas or semicolons between the two numbers', () => {
    expect(parsePowerCurve('3 0.2\n5,1\n7;2.5')).toEqual({ ok: true, points: [{ ms: 3, kw: 0.2 }, { ms: 5, kw: 1 }, { ms: 7, kw: 2.5 }] });
  });
});

describe('site form', () => {
  it('checks the id and the IANA time zone', () => {
    expect(siteFromForm({ id: 'Tarn Edge', name: 'Tarn Edge', timezone: 'Mars/Olympus' })).toEqual({
      ok: false,
      fieldErrors: { id: 'must be 1 to 64 of a-z, 0-9 and -, got "Tarn Edge"', timezone: 'must be an IANA time zone such as Europe/Oslo, got "Mars/Olympus"' },
    });
    expect(siteFromForm({ id: 'tarn-edge', name: ' Tarn Edge ', timezone: 'Europe/Oslo' })).toEqual({
      ok: true,
      value: { id: 'tarn-edge', name: 'Tarn Edge', timezone: 'Europe/Oslo' },
    });
  });
});

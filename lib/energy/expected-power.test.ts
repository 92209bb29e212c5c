import { describe, expect, it } from 'vitest';
import { expectedPowerModel } from './expected-power';
import { energyFieldsOf } from './energy-nameplate';
import { resourcePresence } from './resource';

const wind = {
  kind: 'wind' as const,
  ratedKw: 10,
  powerCurve: [
    { ms: 3, kw: 0 },
    { ms: 11, kw: 10 },
    { ms: 20, kw: 10 },
  ],
  cutInMs: 3,
  cutOutMs: 25,
};
const hydro = { kind: 'hydro' as const, ratedKw: 50, designHeadM: 10, efficiency: 0.8 };

describe('expectedPowerModel', () => {
  it('reads the power curve at the measured wind speed without air density', () => {
    expect(expectedPowerModel(wind)({ windMs: 7 })).toBeCloseTo(5, 12);
  });

  it('normalises the wind speed to 1.225 kg/m³ when air density is given', () => {
    const v = 7 * Math.cbrt(1.1 / 1.225);
    expect(expectedPowerModel(wind)({ windMs: 7, airKgM3: 1.1 })).toBeCloseTo(((v - 3) / 8) * 10, 12);
  });

  it('is unknown without the resource measurement', () => {
    expect(expectedPowerModel(wind)({})).toBeUndefined();
    expect(expectedPowerModel(hydro)({ headM: 10 })).toBeUndefined();
  });

  it('takes measured head over the design head, and caps at the rating', () => {
    const model = expectedPowerModel(hydro);
    expect(model({ flowM3s: 0.5 })).toBeCloseTo(39.22660, 5);
    expect(model({ flowM3s: 0.5, headM: 5 })).toBeCloseTo(19.6133, 4);
    expect(model({ flowM3s: 2 })).toBe(50);
  });

  it('throws RangeError when a field of the kind is missing', () => {
    expect(() => expectedPowerModel({ ...wind, powerCurve: undefined })).toThrow(/powerCurve is required for a wind unit/);
    expect(() => expectedPowerModel({ ...hydro, efficiency: undefined })).toThrow(/efficiency/);
    expect(() => energyFieldsOf({ ...hydro, ratedKw: 0 })).toThrow(/ratedKw/);
  });
});

describe('resourcePresence', () => {
  it('judges wind from cut-in up to, not including, cut-out, at the measured speed', () => {
    const present = resourcePresence(wind);
    expect(present({ windMs: 2.99 })).toBe(false);
    expect(present({ windMs: 3 })).toBe(true);
    expect(present({ windMs: 24.9, airKgM3: 0.9 })).toBe(true);
    expect(present({ windMs: 25 })).toBe(false);
    expect(present({})).toBeUndefined();
  });

  it('judges water by flow above 0', () => {
    const present = resourcePresence(hydro);
    expect(present({ flowM3s: 0 })).toBe(false);
    expect(present({ flowM3s: 0.01 })).toBe(true);
    expect(present({ headM: 10 })).toBeUndefined();
  });
});

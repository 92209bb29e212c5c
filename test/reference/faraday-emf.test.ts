/**
 * Faraday's law and the EMF equation of AC machines against textbook worked
 * examples, and the forward generator model's open-circuit EMF ∝ speed.
 */
import { describe, expect, it } from 'vitest';
import { keFromWinding, phaseEmfRms, rotatingCoilPeakEmf } from '@/lib/physics/faraday';
import { emfLineVolts, generatorTerminals } from '@/lib/physics/generator-model';

describe('rotating-coil EMF (Faraday)', () => {
  it('matches the AC generator worked example: 8 turns, 0.0900 m², 0.500 T, 60 Hz -> 136 V peak', () => {
    // Serway & Jewett, Physics for Scientists and Engineers, chapter "Faraday's law",
    // example "emf induced in a generator" (from memory): ε_max = N·B·A·ω = 8 · 0.500 · 0.0900 · 377 = 136 V.
    expect(rotatingCoilPeakEmf({ turns: 8, areaM2: 0.09, tesla: 0.5, rpm: 3600 })).toBeCloseTo(136, 0);
    // Same example, part B: 12.0 Ω coil shorted by a low-resistance conductor -> I_max = 11.3 A.
    expect(rotatingCoilPeakEmf({ turns: 8, areaM2: 0.09, tesla: 0.5, rpm: 3600 }) / 12).toBeCloseTo(11.3, 1);
  });

  it('the 4.44·f·N·Φ EMF equation is the RMS of the same coil', () => {
    // RMS of a sinusoid is its peak over √2 (any circuits textbook); Φ = B·A for the flat coil.
    const rms = phaseEmfRms({ hz: 60, turns: 8, fluxWb: 0.5 * 0.09 });
    expect(rms).toBeCloseTo(rotatingCoilPeakEmf({ turns: 8, areaM2: 0.09, tesla: 0.5, rpm: 3600 }) / Math.SQRT2, 9);
    // E = 4.44·f·N·Φ·k_w: 4.44 · 50 · 100 · 0.01 · 1 = 222 V (EMF equation, Say, Performance and Design of AC Machines; from memory).
    expect(phaseEmfRms({ hz: 50, turns: 100, fluxWb: 0.01 })).toBeCloseTo(222.1, 1);
  });

  it('a PM machine modelled from its winding has an open-circuit line voltage proportional to speed', () => {
    const ke = keFromWinding({ poles: 16, turns: 80, fluxWb: 0.003, windingFactor: 0.93 });
    const spec = { keVPerKrpm: ke, keRefC: 20, magnet: 'ndfeb' as const, poles: 16, phaseOhm: 0.4, phaseMh: 3 };
    for (const rpm of [150, 300, 600, 900]) {
      const r = generatorTerminals(spec, { rpm, kw: 0 })!;
      expect(r.vab / rpm).toBeCloseTo(ke / 1000, 9);
      expect(r.vab).toBeCloseTo(emfLineVolts(spec, rpm), 9);
    }
  });
});

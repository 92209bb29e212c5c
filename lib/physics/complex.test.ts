import { describe, expect, it } from 'vitest';
import { abs, add, arg, complex, mul, polar, scale, sub, ROTATE_120 } from './complex';

describe('complex', () => {
  it('does phasor arithmetic', () => {
    expect(add(complex(1, 2), complex(3, 4))).toEqual({ re: 4, im: 6 });
    expect(sub(complex(1, 2), complex(3, 4))).toEqual({ re: -2, im: -2 });
    expect(mul(complex(0, 1), complex(0, 1))).toEqual({ re: -1, im: 0 });
    expect(scale(complex(1, -2), 3)).toEqual({ re: 3, im: -6 });
    expect(abs(complex(3, 4))).toBe(5);
    expect(arg(complex(0, 1))).toBeCloseTo(Math.PI / 2, 15);
  });

  it('has a³ = 1 and 1 + a + a² = 0 for the 120° operator', () => {
    const a2 = mul(ROTATE_120, ROTATE_120);
    const a3 = mul(a2, ROTATE_120);
    expect(a3.re).toBeCloseTo(1, 14);
    expect(a3.im).toBeCloseTo(0, 14);
    const sum = add(add(complex(1), ROTATE_120), a2);
    expect(abs(sum)).toBeCloseTo(0, 14);
    expect(abs(polar(2, 1))).toBeCloseTo(2, 15);
  });
});

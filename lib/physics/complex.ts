/**
 * Complex numbers for AC phasors: RMS magnitude and angle in radians.
 * Kept tiny and immutable; the physics code needs only these operations.
 */

/** A phasor or impedance: real and imaginary part (V, A or Ω). */
export interface Complex {
  readonly re: number;
  readonly im: number;
}

/**
 * Builds a complex number from parts.
 * @example complex(3, 4) // { re: 3, im: 4 }
 */
export function complex(re: number, im = 0): Complex {
  return { re, im };
}

/**
 * Phasor of magnitude `abs` at `angleRad` radians.
 * @example polar(230, 0) // { re: 230, im: 0 }
 */
export function polar(abs: number, angleRad: number): Complex {
  return { re: abs * Math.cos(angleRad), im: abs * Math.sin(angleRad) };
}

/**
 * Sum a + b.
 * @example add(complex(1, 2), complex(3, 4)) // { re: 4, im: 6 }
 */
export function add(a: Complex, b: Complex): Complex {
  return { re: a.re + b.re, im: a.im + b.im };
}

/**
 * Difference a − b (a line voltage from two phase voltages).
 * @example sub(complex(1, 2), complex(3, 4)) // { re: -2, im: -2 }
 */
export function sub(a: Complex, b: Complex): Complex {
  return { re: a.re - b.re, im: a.im - b.im };
}

/**
 * Product a · b (current times impedance gives a voltage drop).
 * @example mul(complex(0, 1), complex(0, 1)) // { re: -1, im: 0 }
 */
export function mul(a: Complex, b: Complex): Complex {
  return { re: a.re * b.re - a.im * b.im, im: a.re * b.im + a.im * b.re };
}

/**
 * Product of a complex number and a real factor.
 * @example scale(complex(1, -2), 3) // { re: 3, im: -6 }
 */
export function scale(a: Complex, k: number): Complex {
  return { re: a.re * k, im: a.im * k };
}

/**
 * Magnitude |a| (RMS value of a phasor).
 * @example abs(complex(3, 4)) // 5
 */
export function abs(a: Complex): number {
  return Math.hypot(a.re, a.im);
}

/**
 * Angle of a in radians, −π..π.
 * @example arg(complex(0, 1)) // 1.5707963267948966
 */
export function arg(a: Complex): number {
  return Math.atan2(a.im, a.re);
}

/** The 120° rotation operator a = 1∠120° of symmetrical components (Fortescue, 1918). */
export const ROTATE_120: Complex = polar(1, (2 * Math.PI) / 3);

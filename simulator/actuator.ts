/**
 * One axis of a unit's actuator: a geared motor with an encoder on the motor side, travel limits, slew speed, backlash
 * between motor and structure, wear (slower, more current, more backlash) and the two faults an axis can have: stall
 * (the motor is powered but nothing moves) and slip (the structure falls behind what the encoder counts).
 * The encoder is what the unit reports; the structure's true angle is what its detectors and panel see.
 */
export interface AxisSpec {
  minDeg: number;
  maxDeg: number;
  /** Slew speed of the structure [°/s]. */
  speedDegS: number;
  /** Free play between motor and structure [°]. */
  backlashDeg: number;
}

export interface AxisState {
  /** Motor-side angle, as the encoder reads it [°]. */
  encoderDeg: number;
  /** True angle of the structure [°]. */
  trueDeg: number;
  /** Commanded angle [°]. */
  targetDeg: number;
  /** Motor current [A] in the last step. */
  currentA: number;
  /** Wear 0 (new) … 1 (worn out). */
  wear: number;
  stalled: boolean;
  /** Fraction of motor travel lost to slip while moving (0 = none). */
  slipFraction: number;
  /** Accumulated slip offset between encoder and structure [°]. */
  slipOffsetDeg: number;
}

export function createAxis(spec: AxisSpec, startDeg: number, wear = 0): AxisState {
  const p = clamp(startDeg, spec.minDeg, spec.maxDeg);
  return { encoderDeg: p, trueDeg: p, targetDeg: p, currentA: 0.05, wear, stalled: false, slipFraction: 0, slipOffsetDeg: 0 };
}

export function clamp(x: number, lo: number, hi: number): number {
  return x < lo ? lo : x > hi ? hi : x;
}

/** Sets a new target inside the travel limits. */
export function setTarget(spec: AxisSpec, axis: AxisState, targetDeg: number): void {
  axis.targetDeg = clamp(targetDeg, spec.minDeg, spec.maxDeg);
}

/** Whether the encoder has reached the target (within a tolerance). */
export function atTarget(axis: AxisState, tolDeg = 0.05): boolean {
  return Math.abs(axis.targetDeg - axis.encoderDeg) <= tolDeg;
}

const IDLE_A = 0.05;
const RUN_A = 1.2;
const STALL_A = 3.8;

/** Moves the axis for dt seconds toward its target; returns the encoder travel [°]. */
export function stepAxis(spec: AxisSpec, axis: AxisState, dtS: number): number {
  const err = axis.targetDeg - axis.encoderDeg;
  if (Math.abs(err) < 1e-6) {
    axis.currentA = IDLE_A;
    return 0;
  }
  if (axis.stalled) {
    axis.currentA = STALL_A;
    return 0;
  }
  const speed = spec.speedDegS * (1 - 0.5 * axis.wear);
  const move = clamp(err, -speed * dtS, speed * dtS);
  axis.encoderDeg = clamp(axis.encoderDeg + move, spec.minDeg, spec.maxDeg);
  if (axis.slipFraction > 0) axis.slipOffsetDeg += move * axis.slipFraction;
  // Backlash: the structure follows the motor only once the free play on the driving side is taken up.
  const half = (spec.backlashDeg * (1 + 3 * axis.wear)) / 2;
  const driven = axis.encoderDeg - axis.slipOffsetDeg;
  axis.trueDeg = clamp(clamp(axis.trueDeg, driven - half, driven + half), spec.minDeg - 5, spec.maxDeg + 5);
  axis.currentA = RUN_A * (1 + 2 * axis.wear) * (0.6 + 0.4 * Math.min(1, Math.abs(move) / Math.max(1e-9, speed * dtS)));
  return move;
}

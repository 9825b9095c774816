// The step ladder designer: from the PWM duty wanted at each speed step, the bottom resistor of the stepped
// control-voltage divider for each step, snapped to an IEC 60063 series, with the duty it really gives.
//
// Circuit: a 555-type astable (RA, RB) whose control pin is driven by r_top from Vcc and one bottom resistor per
// step to ground; inside the timer the pin sits at v_int (⅔·Vcc) behind r_int, the fitted timer's control-pin source
// resistance (its part's r_ctl rating: about 3.33 kΩ for a bipolar part, far higher for a CMOS one). Duty follows the
// control-voltage form of the astable (thresholds Vc and Vc/2): t_H = (RA+RB)·C·ln((Vcc − Vc/2)/(Vcc − Vc)),
// t_L = ln2·RB·C; C cancels in the duty.
import { eNear } from './eseries.ts';

/**
 * The control-pin source resistance of a timer whose internal divider is three equal resistors r_div: the upper one
 * in parallel with the lower two, ⅔·r_div (Thevenin arithmetic). A bipolar 555's 3 × 5 kΩ gives 3.33 kΩ.
 */
export function controlPinSource(rDiv: number): number {
  return (rDiv * 2 * rDiv) / (rDiv + 2 * rDiv);
}

export interface LadderInput {
  vcc: number;
  ra: number;
  rb: number;
  rTop: number;
  /** Duty wanted at each step, as fractions, step 1 first. Give this or `spread`. */
  duties?: readonly number[];
  /** Evenly spaced duties from `min` at step 1 to `max` at the last step. */
  spread?: { steps: number; min: number; max: number };
  /** IEC 60063 series to snap to: 3, 6, 12, 24, 48, 96 or 192. */
  series: number;
  /** Control-pin source resistance of the fitted timer (its r_ctl rating); no default, since it depends on the part. */
  rInt: number;
  /** Control pin open-circuit voltage; default ⅔·vcc. */
  vInt?: number;
}

export interface LadderStep {
  step: number;
  targetDuty: number;
  /** Control voltage that gives the target duty exactly. */
  idealCtl: number;
  /** Bottom resistor that gives that control voltage exactly. */
  idealR: number;
  /** The nearest member of the chosen series. */
  chosenR: number;
  achievedCtl: number;
  achievedDuty: number;
  /** achievedDuty − targetDuty, as a fraction (0.01 = one percentage point). */
  error: number;
}

export type LadderResult = { ok: true; steps: LadderStep[]; series: number } | { ok: false; error: string };

/** Duty of the astable at control voltage vc (valid for 0 < vc < vcc). */
export function astableDuty(ra: number, rb: number, vcc: number, vc: number): number {
  const high = (ra + rb) * Math.log((vcc - vc / 2) / (vcc - vc));
  const low = Math.LN2 * rb;
  return high / (high + low);
}

/** Control voltage giving duty d: invert t_H/t_L = d/(1−d) for x = (Vcc − Vc/2)/(Vcc − Vc), then Vc = Vcc(x−1)/(x−½). */
export function ctlForDuty(d: number, ra: number, rb: number, vcc: number): number {
  const x = Math.exp((Math.LN2 * rb * d) / ((1 - d) * (ra + rb)));
  return (vcc * (x - 1)) / (x - 0.5);
}

/** Voltage at the control pin: node equation of r_top to vcc, r_bottom to ground and the internal v_int behind r_int. */
export function ctlNode(vcc: number, rTop: number, rBottom: number, rInt: number, vInt = (2 / 3) * vcc): number {
  return (vcc / rTop + vInt / rInt) / (1 / rTop + 1 / rBottom + 1 / rInt);
}

/** Bottom resistor that puts the control pin at vc: the node equation solved for 1/r_bottom. */
export function bottomForCtl(vc: number, vcc: number, rTop: number, rInt: number, vInt = (2 / 3) * vcc): number {
  const g = (vcc / rTop + vInt / rInt) / vc - 1 / rTop - 1 / rInt;
  return 1 / g;
}

function positive(name: string, v: number | undefined): string | null {
  return v !== undefined && Number.isFinite(v) && v > 0 ? null : `${name} must be a positive number`;
}

/** Designs the ladder; every input is checked and a bad one gives a message instead of numbers. */
export function designLadder(input: LadderInput): LadderResult {
  const rInt = input.rInt;
  const vInt = input.vInt ?? (2 / 3) * input.vcc;
  for (const [name, v] of [
    ['vcc', input.vcc],
    ['ra', input.ra],
    ['rb', input.rb],
    ['r_top', input.rTop],
    ['r_int (the timer part\'s r_ctl rating)', rInt],
    ['v_int', vInt],
  ] as const) {
    const bad = positive(name, v);
    if (bad) return { ok: false, error: bad };
  }
  let duties: number[];
  if (input.duties && input.duties.length > 0) duties = [...input.duties];
  else if (input.spread) {
    const { steps, min, max } = input.spread;
    if (!Number.isInteger(steps) || steps < 1) return { ok: false, error: 'the number of steps must be a whole number from 1' };
    if (!(min < max) && steps > 1) return { ok: false, error: 'the lowest duty must be below the highest' };
    duties = Array.from({ length: steps }, (_, i) => (steps === 1 ? max : min + ((max - min) * i) / (steps - 1)));
  } else return { ok: false, error: 'give the duty wanted at each step, or a lowest and highest duty' };
  if (!Number.isFinite(input.series)) return { ok: false, error: 'choose an E-series' };
  // With no bottom resistor the pin rises to this voltage; a step needing more cannot be reached with this r_top.
  const vOpen = (input.vcc / input.rTop + vInt / rInt) / (1 / input.rTop + 1 / rInt);
  const steps: LadderStep[] = [];
  for (let i = 0; i < duties.length; i++) {
    const d = duties[i]!;
    if (!(Number.isFinite(d) && d > 0 && d < 1)) return { ok: false, error: `step ${i + 1}: duty ${d} must be between 0 and 1 (not including them)` };
    const idealCtl = ctlForDuty(d, input.ra, input.rb, input.vcc);
    if (!(idealCtl < vOpen)) {
      return {
        ok: false,
        error: `step ${i + 1}: duty ${(d * 100).toFixed(1)} % needs ${idealCtl.toFixed(3)} V at the control pin, but the divider reaches at most ${vOpen.toFixed(3)} V; lower r_top or the duty`,
      };
    }
    const idealR = bottomForCtl(idealCtl, input.vcc, input.rTop, rInt, vInt);
    const snapped = eNear(idealR, input.series);
    if (!snapped.ok) return { ok: false, error: `step ${i + 1}: ${snapped.error}` };
    const achievedCtl = ctlNode(input.vcc, input.rTop, snapped.value, rInt, vInt);
    const achievedDuty = astableDuty(input.ra, input.rb, input.vcc, achievedCtl);
    steps.push({ step: i + 1, targetDuty: d, idealCtl, idealR, chosenR: snapped.value, achievedCtl, achievedDuty, error: achievedDuty - d });
  }
  return { ok: true, steps, series: input.series };
}

/** Variant parameters for a designed ladder: r_s1 … r_sN with the chosen resistors. */
export function ladderParams(result: { steps: readonly LadderStep[] }): Record<string, number> {
  const out: Record<string, number> = {};
  for (const s of result.steps) out[`r_s${s.step}`] = s.chosenR;
  return out;
}

// IEC 60063 preferred number series E3 to E192, written out as the standard lists them (not computed: E24 and below
// depart from the rounded geometric formula at several values, and E192 has 920 where the formula gives 919),
// with nearest / next up / next down over all decades.

export type ESeriesResult = { ok: true; value: number } | { ok: false; error: string };

/** Series with two significant figures, one decade from 10 to below 100. */
const E3 = [10, 22, 47] as const;
const E6 = [10, 15, 22, 33, 47, 68] as const;
const E12 = [10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82] as const;
const E24 = [10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91] as const;

/** Series with three significant figures, one decade from 100 to below 1000. */
const E48 = [
  100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169, 178, 187, 196, 205,
  215, 226, 237, 249, 261, 274, 287, 301, 316, 332, 348, 365, 383, 402, 422, 442,
  464, 487, 511, 536, 562, 590, 619, 649, 681, 715, 750, 787, 825, 866, 909, 953,
] as const;
const E96 = [
  100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143,
  147, 150, 154, 158, 162, 165, 169, 174, 178, 182, 187, 191, 196, 200, 205, 210,
  215, 221, 226, 232, 237, 243, 249, 255, 261, 267, 274, 280, 287, 294, 301, 309,
  316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453,
  464, 475, 487, 499, 511, 523, 536, 549, 562, 576, 590, 604, 619, 634, 649, 665,
  681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976,
] as const;
const E192 = [
  100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114, 115, 117, 118, 120,
  121, 123, 124, 126, 127, 129, 130, 132, 133, 135, 137, 138, 140, 142, 143, 145,
  147, 149, 150, 152, 154, 156, 158, 160, 162, 164, 165, 167, 169, 172, 174, 176,
  178, 180, 182, 184, 187, 189, 191, 193, 196, 198, 200, 203, 205, 208, 210, 213,
  215, 218, 221, 223, 226, 229, 232, 234, 237, 240, 243, 246, 249, 252, 255, 258,
  261, 264, 267, 271, 274, 277, 280, 284, 287, 291, 294, 298, 301, 305, 309, 312,
  316, 320, 324, 328, 332, 336, 340, 344, 348, 352, 357, 361, 365, 370, 374, 379,
  383, 388, 392, 397, 402, 407, 412, 417, 422, 427, 432, 437, 442, 448, 453, 459,
  464, 470, 475, 481, 487, 493, 499, 505, 511, 517, 523, 530, 536, 542, 549, 556,
  562, 569, 576, 583, 590, 597, 604, 612, 619, 626, 634, 642, 649, 657, 665, 673,
  681, 690, 698, 706, 715, 723, 732, 741, 750, 759, 768, 777, 787, 796, 806, 816,
  825, 835, 845, 856, 866, 876, 887, 898, 909, 920, 931, 942, 953, 965, 976, 988,
] as const;

/** Every series by its number n (values per decade). Entries are one decade of mantissas, ascending. */
export const E_SERIES: Readonly<Record<number, readonly number[]>> = {
  3: E3,
  6: E6,
  12: E12,
  24: E24,
  48: E48,
  96: E96,
  192: E192,
};

/** The series numbers a caller may ask for, ascending. */
export const E_SERIES_NUMBERS = [3, 6, 12, 24, 48, 96, 192] as const;

/** A value counts as already in the series when it is within this relative distance of a member (float noise). */
const SAME = 1e-9;

/** The members of series `n` near `value`: the decade holding it and the decades on each side, ascending. */
function membersAround(value: number, n: number): number[] | string {
  const table = E_SERIES[n];
  if (!table) return `unknown series E${n}; use one of ${E_SERIES_NUMBERS.join(', ')}`;
  if (typeof value !== 'number' || !Number.isFinite(value)) return `the value must be a finite number (got ${String(value)})`;
  if (value <= 0) return `preferred values are above zero (got ${value})`;
  const figures = table[0] === 10 ? 2 : 3;
  const decade = Math.floor(Math.log10(value));
  const out: number[] = [];
  for (let k = decade - 1; k <= decade + 1; k++) {
    // Number("47e-10") is the double nearest 4.7e-9, exactly what a user typing 4.7n gets.
    for (const m of table) out.push(Number(`${m}e${k - (figures - 1)}`));
  }
  return out;
}

function same(a: number, b: number): boolean {
  return Math.abs(a - b) <= SAME * Math.max(Math.abs(a), Math.abs(b));
}

/** The member of series `n` nearest `value` on a log scale (ratio, not difference); a tie goes to the higher one. */
export function eNear(value: number, n: number): ESeriesResult {
  const members = membersAround(value, n);
  if (typeof members === 'string') return { ok: false, error: members };
  let best = members[0]!;
  let bestDist = Infinity;
  for (const m of members) {
    const dist = Math.abs(Math.log(m / value));
    if (dist <= bestDist) {
      best = m;
      bestDist = dist;
    }
  }
  return { ok: true, value: best };
}

/** The smallest member of series `n` that is at least `value` (a member is its own up). */
export function eUp(value: number, n: number): ESeriesResult {
  const members = membersAround(value, n);
  if (typeof members === 'string') return { ok: false, error: members };
  const found = members.find((m) => m >= value || same(m, value));
  return found === undefined ? { ok: false, error: `no E${n} value above ${value}` } : { ok: true, value: found };
}

/** The largest member of series `n` that is at most `value` (a member is its own down). */
export function eDown(value: number, n: number): ESeriesResult {
  const members = membersAround(value, n);
  if (typeof members === 'string') return { ok: false, error: members };
  const found = [...members].reverse().find((m) => m <= value || same(m, value));
  return found === undefined ? { ok: false, error: `no E${n} value below ${value}` } : { ok: true, value: found };
}

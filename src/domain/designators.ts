// Reference designators as a build line gives them ("R9, R10", "D3–D8") and the ones one variant actually places.
// A line written for the whole family names every position the largest variant fills; a variant whose quantity rule
// gives fewer fills the first ones in order, so its costed BOM names those (D3–D6 for four steps, not D3–D8).

/** One designator: letters, then a number (R9, D3, BR1). */
const REF = /^([A-Za-z]+)(\d+)$/;
/** A range of one prefix, with a hyphen or an en dash: D3–D8, R10-R12. */
const RANGE = /^([A-Za-z]+)(\d+)[–-]([A-Za-z]+)?(\d+)$/;
/** The longest list a range may spell out; beyond it the text is left as it is. */
const MAX_EXPANDED = 1000;

/** The designators a text names, one each, in order; undefined when the text is not a plain list of them. */
export function expandDesignators(text: string): string[] | undefined {
  const out: string[] = [];
  for (const raw of text.replace(/\s*([–-])\s*/g, '$1').split(/[,;\s]+/)) {
    const item = raw.trim();
    if (item === '') continue;
    const one = REF.exec(item);
    if (one) {
      out.push(item);
      continue;
    }
    const range = RANGE.exec(item);
    if (!range) return undefined;
    const [, prefix, from, prefix2, to] = range;
    if (prefix2 !== undefined && prefix2 !== prefix) return undefined;
    const a = Number(from);
    const b = Number(to);
    if (b < a || b - a + 1 + out.length > MAX_EXPANDED) return undefined;
    for (let n = a; n <= b; n++) out.push(`${prefix}${n}`);
  }
  return out.length ? out : undefined;
}

/** Designators written back compactly: runs of three or more of one prefix as a range with an en dash. */
export function compactDesignators(refs: readonly string[]): string {
  const parts: string[] = [];
  let i = 0;
  while (i < refs.length) {
    const m = REF.exec(refs[i]!);
    let j = i;
    if (m) {
      while (j + 1 < refs.length) {
        const n = REF.exec(refs[j + 1]!);
        if (!n || n[1] !== m[1] || Number(n[2]) !== Number(m[2]) + (j + 1 - i)) break;
        j++;
      }
    }
    if (j - i >= 2) parts.push(`${refs[i]}–${refs[j]}`);
    else for (let k = i; k <= j; k++) parts.push(refs[k]!);
    i = j + 1;
  }
  return parts.join(', ');
}

/**
 * The designators a variant places when a line names `text` and the variant takes `qtyPerUnit` of the part: the
 * first `qtyPerUnit` of them when the line names more, else the text unchanged (a quantity that is not a whole
 * number, a text that is not a plain list, or one name for several pieces such as a pair of pads).
 */
export function usedDesignators(text: string, qtyPerUnit: number): string {
  if (!Number.isInteger(qtyPerUnit) || qtyPerUnit < 1) return text;
  const refs = expandDesignators(text);
  if (!refs || refs.length <= qtyPerUnit) return text;
  return compactDesignators(refs.slice(0, qtyPerUnit));
}

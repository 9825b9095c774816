// Build-line drafts for the Build page: the pure checks that turn a draft into a BuildLine or into messages keyed by
// field, the per-variant trial of its rules (through the family resolver), and reordering. No DOM, no Lit.
import type { Book, BuildLine, CostCategory, Part } from '../domain/book.ts';
import { COST_CATEGORIES } from '../domain/book.ts';
import { LIMITS } from '../domain/schema.ts';
import { partByMpn } from '../domain/stock.ts';
import type { LineOutcome } from '../engine/line-trial.ts';
import { guardFormula } from '../engine/formula-guard.ts';
import { formulaBody, tokenizeFormula } from '../engine/formula-names.ts';
import type { FieldProblems, FormResult } from './record-forms.ts';

export interface BuildLineDraft {
  designators: string;
  /** Maker part number of a fixed part (matched like the Parts page does); empty when a part rule chooses it. */
  part: string;
  partRule: string;
  qtyRule: string;
  appliesWhen: string;
  category: string;
  role: string;
  /** Attrition in percent as typed ("2" or "2 %"); empty = the Book's default for the part kind. */
  attrition: string;
  /** Supplier name; empty = no pin. */
  pinnedSupplier: string;
  /** Maker part numbers of the approved alternates, best first (a fixed-part line only). */
  alternates: string[];
  /** Maker part number of the approved part costing must buy; empty = the cheapest in time. */
  pinnedPart: string;
  notes: string;
}

export function buildLineDraft(book: Book, line?: BuildLine): BuildLineDraft {
  const part = line?.partId ? book.parts.find((p) => p.id === line.partId) : undefined;
  const pin = line?.pinnedSupplierId ? book.suppliers.find((s) => s.id === line.pinnedSupplierId) : undefined;
  return {
    designators: line?.designators ?? '',
    part: part?.mpn ?? line?.partId ?? '',
    partRule: line?.partRule ?? '',
    qtyRule: line?.qtyRule ?? '1',
    appliesWhen: line?.appliesWhen ?? '',
    category: line?.category ?? '',
    role: line?.role ?? '',
    attrition: line?.attrition === undefined ? '' : String(Number((line.attrition * 100).toPrecision(6))),
    pinnedSupplier: pin?.name ?? line?.pinnedSupplierId ?? '',
    alternates: (line?.alternates ?? []).map((id) => book.parts.find((p) => p.id === id)?.mpn ?? id),
    pinnedPart: line?.pinnedPartId ? (book.parts.find((p) => p.id === line.pinnedPartId)?.mpn ?? line.pinnedPartId) : '',
    notes: line?.notes ?? '',
  };
}

/** A part of the Book by maker part number (as the Parts page matches it) or by id. */
export function findPart(book: Book, text: string): Part | undefined {
  return partByMpn(book.parts, text) ?? book.parts.find((p) => p.id === text);
}

/**
 * Why `text` cannot be approved as the next alternate of the draft's line: a rule line or a line with no part of
 * its own, a part not in the Book, the line's own part, one approved already, or too many. Undefined when it can.
 * `others` are the alternates it is checked against (by default the draft's).
 */
export function alternateProblem(text: string, d: BuildLineDraft, book: Book, others: readonly string[] = d.alternates): string | undefined {
  const mpn = text.trim();
  if (mpn === '') return 'type the maker part number of a part of the Book to approve';
  if (formulaBody(d.partRule) !== '') return 'a line whose part rule picks the part has no approved alternates: approve second sources on a line with a fixed part';
  if (d.part.trim() === '') return 'give the line its own part first; alternates are approved beside it';
  const part = findPart(book, mpn);
  if (!part) return `no part ${mpn} in the Book; add it on the Parts page first`;
  const own = findPart(book, d.part.trim());
  if (own?.id === part.id) return `${part.mpn} is the line's own part; an alternate is another part`;
  if (others.some((o) => findPart(book, o)?.id === part.id)) return `${part.mpn} is approved on this line already`;
  if (others.length >= LIMITS.alternates) return `at most ${LIMITS.alternates} approved alternates per line`;
  return undefined;
}

/** Why a rule's text cannot be read, before any variant is tried. Empty text is allowed unless `required`. */
export function ruleTextProblem(text: string, what: string, required: boolean): string | undefined {
  const body = formulaBody(text);
  if (body === '') return required ? `${what} is required` : undefined;
  const g = guardFormula(body);
  if (!g.ok) return g.refusal.message;
  const t = tokenizeFormula(body);
  return t.ok ? undefined : t.error;
}

/** The next position after every line, in steps of ten so a line can later be put between two. */
export function nextPosition(book: Book): number {
  return book.buildLines.reduce((m, l) => Math.max(m, l.position), 0) + 10;
}

/**
 * Checks a draft against the Book: the text of each rule, the part and pinned supplier by name, category and
 * attrition. Gives the line (rev 0 and the next position for a new one) or messages keyed by field.
 */
export function validateBuildLine(
  d: BuildLineDraft,
  book: Book,
  editing: BuildLine | undefined,
  makeId: () => string,
): FormResult<BuildLine> {
  const problems: FieldProblems = {};
  const designators = d.designators.trim();
  if (designators === '') problems.designators = 'designators are required (for example R1 or C6, C7)';
  else if (designators.length > 200) problems.designators = 'at most 200 characters';

  const partText = d.part.trim();
  let partId: string | undefined;
  if (partText !== '') {
    const part = findPart(book, partText);
    if (!part) problems.part = `no part ${partText} in the Book; add it on the Parts page first`;
    else partId = part.id;
  }
  const partRule = formulaBody(d.partRule);
  const pr = ruleTextProblem(d.partRule, 'the part rule', false);
  if (pr) problems.partRule = pr;
  if (partText === '' && partRule === '' && !problems.part) problems.part = 'give a part, or a part rule that chooses one per variant';

  const qp = ruleTextProblem(d.qtyRule, 'the quantity rule', true);
  if (qp) problems.qtyRule = qp;
  const ap = ruleTextProblem(d.appliesWhen, 'the applies-when rule', false);
  if (ap) problems.appliesWhen = ap;

  const category = d.category.trim();
  if (!(COST_CATEGORIES as readonly string[]).includes(category)) problems.category = `choose one of ${COST_CATEGORIES.join(', ')}`;

  const role = d.role.trim();
  if (role !== '' && !/^[a-z][a-z0-9_]*$/.test(role)) {
    problems.role = 'small letters, digits and _, starting with a letter (checks read <role>_<rating>)';
  }

  let attrition: number | undefined;
  const at = d.attrition.trim().replace(/\s*%$/, '');
  if (at !== '') {
    const n = Number(at);
    if (!Number.isFinite(n) || n < 0 || n >= 100) problems.attrition = 'a percentage from 0 up to (not including) 100, or blank for the Book’s default';
    else attrition = Number((n / 100).toPrecision(12));
  }

  let pinnedSupplierId: string | undefined;
  const pin = d.pinnedSupplier.trim();
  if (pin !== '') {
    const s = book.suppliers.find((x) => x.name.trim().toLowerCase() === pin.toLowerCase()) ?? book.suppliers.find((x) => x.id === pin);
    if (!s) problems.pinnedSupplier = `no supplier ${pin} in the Book`;
    else pinnedSupplierId = s.id;
  }

  // Approved alternates: each checked against the line and those ranked before it.
  const alternates: string[] = [];
  for (let i = 0; i < d.alternates.length; i++) {
    const bad = alternateProblem(d.alternates[i]!, d, book, d.alternates.slice(0, i));
    if (bad) {
      problems.alternates = bad;
      break;
    }
    alternates.push(findPart(book, d.alternates[i]!.trim())!.id);
  }
  let pinnedPartId: string | undefined;
  const pinPart = d.pinnedPart.trim();
  if (pinPart !== '') {
    const part = findPart(book, pinPart);
    if (!part) problems.pinnedPart = `no part ${pinPart} in the Book`;
    else if (part.id !== partId && !alternates.includes(part.id)) problems.pinnedPart = `${part.mpn} is not approved on this line: pin the line's part or one of its alternates`;
    else pinnedPartId = part.id;
  }

  if (Object.keys(problems).length > 0) return { ok: false, problems };
  const record: BuildLine = {
    id: editing?.id ?? makeId(),
    rev: editing?.rev ?? 0,
    position: editing?.position ?? nextPosition(book),
    designators,
    qtyRule: formulaBody(d.qtyRule),
    appliesWhen: formulaBody(d.appliesWhen),
    category: category as CostCategory,
  };
  if (partId !== undefined) record.partId = partId;
  if (partRule !== '') record.partRule = partRule;
  if (role !== '') record.role = role;
  if (attrition !== undefined) record.attrition = attrition;
  if (pinnedSupplierId !== undefined) record.pinnedSupplierId = pinnedSupplierId;
  if (alternates.length > 0) record.alternates = alternates;
  if (pinnedPartId !== undefined) record.pinnedPartId = pinnedPartId;
  if (d.notes.trim() !== '') record.notes = d.notes.trim();
  return { ok: true, record };
}

export { lineOutcomes, lineSummaries, withLine } from '../engine/line-trial.ts';
export type { LineOutcome, LineSummary } from '../engine/line-trial.ts';

/** The field a resolver message belongs beside, read from its opening words. */
export function problemField(message: string): keyof BuildLineDraft {
  if (message.startsWith('applies-when rule')) return 'appliesWhen';
  if (message.startsWith('quantity rule') || message.startsWith('quantity per unit')) return 'qtyRule';
  if (message.startsWith('part rule') || message.startsWith('unknown part number')) return 'partRule';
  if (message.startsWith('role ')) return 'role';
  return 'part';
}

/**
 * Problems of a line tried on every variant (see CostingService.trialLine), gathered beside the field they belong to,
 * naming the variants whose rules fail ("FR3-40-CD, FR4-60-CD: quantity rule: unknown name x").
 */
export function trialProblems(outcomes: readonly LineOutcome[]): FieldProblems {
  const byField = new Map<keyof BuildLineDraft, Map<string, string[]>>();
  for (const o of outcomes) {
    if (o.problem === undefined) continue;
    for (const message of o.problem.split('; ')) {
      const f = problemField(message);
      const byMessage = byField.get(f) ?? new Map<string, string[]>();
      byField.set(f, byMessage);
      const codes = byMessage.get(message) ?? [];
      codes.push(o.variantCode);
      byMessage.set(message, codes);
    }
  }
  const problems: FieldProblems = {};
  for (const [f, byMessage] of byField) {
    problems[f] = [...byMessage]
      .map(([message, codes]) => `${codes.length === outcomes.length && codes.length > 1 ? 'every variant' : codes.join(', ')}: ${message}`)
      .join(' · ');
  }
  return problems;
}

/** Lines in the order they are shown: by position, then id (as the family resolver orders them). */
export function orderedLines(book: Book): BuildLine[] {
  return [...book.buildLines].sort((a, b) => a.position - b.position || a.id.localeCompare(b.id));
}

/**
 * Moves a line one place up (−1) or down (+1). Gives the lines whose position changes, renumbered in steps of ten
 * so equal positions become distinct; an empty list when the line is already at that end or unknown.
 */
export function moveLine(book: Book, lineId: string, step: -1 | 1): BuildLine[] {
  const lines = orderedLines(book);
  const i = lines.findIndex((l) => l.id === lineId);
  const j = i + step;
  if (i < 0 || j < 0 || j >= lines.length) return [];
  const order = [...lines];
  order[i] = lines[j]!;
  order[j] = lines[i]!;
  const changed: BuildLine[] = [];
  order.forEach((l, k) => {
    const position = (k + 1) * 10;
    if (l.position !== position) changed.push({ ...l, position });
  });
  return changed;
}

// Seeded reference family for the benchmark and the costing tests: an invented regulator family of any size (200
// variants × 80 build lines × 4 price breaks × 3 run sizes by default), with its resolved lines, same seed → same Book.
import { BOOK_FORMAT, BOOK_VERSION, defaultSettings } from './book.ts';
import type { Book, BuildLine, Part, PartKind, Quote, Supplier, Variant } from './book.ts';
import type { ResolvedLine } from './costing.ts';

export interface RefamilyOptions {
  variants: number;
  lines: number;
  breaks: number;
  runSizes: number[];
  seed: number;
}

export const REFERENCE_FAMILY: RefamilyOptions = { variants: 200, lines: 80, breaks: 4, runSizes: [500, 2000, 10000], seed: 20250601 };
export const LARGE_FAMILY: RefamilyOptions = { variants: 2000, lines: 150, breaks: 4, runSizes: [500, 2000, 10000], seed: 20250602 };

export interface Refamily {
  book: Book;
  /** Each variant's build lines as the generator chose them (the same answer the formula resolver gives). */
  resolution: Map<string, ResolvedLine[]>;
}

/** Small fast PRNG (mulberry32): deterministic across platforms, which is all a benchmark fixture needs. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const STAGES = ['mosfet', 'triac', 'capacitor'] as const;
const SUPPLIES = ['dropper', 'transformer', 'switcher'] as const;
const KINDS: PartKind[] = ['resistor', 'capacitor', 'diode', 'zener', 'transistor', 'ic', 'connector', 'hardware'];
const SUPPLIERS: { name: string; currency: string }[] = [
  { name: 'Tarnwick Parts', currency: 'EUR' },
  { name: 'Bellfourd Supply', currency: 'USD' },
  { name: 'Quenby Components', currency: 'GBP' },
];

/** How a line varies across the family. */
type LineShape = 'common' | 'perStep' | 'stage' | 'choice';

/** Builds the reference family. Pure and deterministic: the same options give a deep-equal Book. */
export function referenceFamily(options: Partial<RefamilyOptions> = {}): Refamily {
  const o = { ...REFERENCE_FAMILY, ...options };
  const rnd = seededRandom(o.seed);
  const int = (lo: number, hi: number): number => lo + Math.floor(rnd() * (hi - lo + 1));
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rnd() * xs.length)]!;
  const price = (x: number): number => Math.round(x * 10_000) / 10_000;

  const settings = {
    ...defaultSettings(),
    bookName: 'Reference family',
    company: 'Halloway Fan Controls (invented)',
    baseCurrency: 'EUR',
    rates: { EUR: 1, USD: 0.9213, GBP: 1.1687 },
    runSizes: [...o.runSizes],
    labourRatePerHour: 24,
    labourMinutesPerUnit: 2.5,
    labourMinutesPerPlacement: 0.06,
    testCostPerUnit: 0.35,
    overheadPct: 60,
    marginPct: 35,
    attrition: { default: 0.01, resistor: 0.02, capacitor: 0.02, ic: 0.005 },
    costingDate: '2025-06-01',
  };
  const suppliers: Supplier[] = SUPPLIERS.map((s, i) => ({ id: `sup${i + 1}`, rev: 1, name: s.name, currency: s.currency, notes: '' }));

  const parts: Part[] = [];
  const quotes: Quote[] = [];
  const newPart = (): Part => {
    const n = parts.length + 1;
    const kind = pick(KINDS);
    const p: Part = {
      id: `p${n}`,
      rev: 1,
      mpn: `HFC-${kind.slice(0, 3).toUpperCase()}-${String(n).padStart(5, '0')}`,
      maker: 'Halloway own make (invented)',
      description: `reference ${kind} ${n}`,
      kind,
      ratings: {},
      package: pick(['0603', '0805', 'SOT-23', 'TO-220', 'DIP-8', 'radial']),
      placements: kind === 'hardware' ? 0 : 1,
    };
    parts.push(p);
    // 1 to 3 suppliers, each with `breaks` price breaks falling with quantity.
    const unit = price(0.005 + rnd() * rnd() * 2.5);
    const order = [...suppliers];
    for (let i = order.length - 1; i > 0; i--) {
      const j = Math.floor(rnd() * (i + 1));
      [order[i], order[j]] = [order[j]!, order[i]!];
    }
    const sups = order.slice(0, int(1, 3));
    for (const s of sups) {
      const firstQty = pick([1, 10, 100]);
      const breaks = [];
      let qty = firstQty;
      let pr = price(unit * (0.85 + rnd() * 0.3) / (s.currency === 'EUR' ? 1 : settings.rates[s.currency as 'USD' | 'GBP']));
      for (let b = 0; b < o.breaks; b++) {
        breaks.push({ qty, price: Math.max(pr, 0.0001) });
        qty *= pick([5, 10]);
        pr = price(pr * (0.7 + rnd() * 0.2));
      }
      quotes.push({
        id: `q${quotes.length + 1}`,
        rev: 1,
        partId: p.id,
        supplierId: s.id,
        supplierCode: `${s.name.slice(0, 2).toUpperCase()}${int(100000, 999999)}`,
        currency: s.currency,
        breaks,
        moq: pick([1, 1, 10, 50, 100, 250]),
        pack: pick([1, 1, 5, 10, 50, 100]),
        leadDays: int(3, 60),
        date: '2025-05-01',
        source: 'reference generator',
      });
    }
    return p;
  };

  const variants: Variant[] = [];
  for (let v = 0; v < o.variants; v++) {
    variants.push({
      id: `v${v + 1}`,
      rev: 1,
      code: `REF-${String(v + 1).padStart(4, '0')}`,
      name: `reference variant ${v + 1}`,
      params: {
        steps: int(1, 8),
        load_w: pick([40, 60, 75, 100, 150]),
        mains_v: pick([230, 120]),
        stage: pick(STAGES),
        supply: pick(SUPPLIES),
      },
    });
  }

  const lines: BuildLine[] = [];
  /** Per line, how each variant resolves it. */
  const deciders: ((v: Variant) => { partId: string; qty: number; applies: boolean })[] = [];
  for (let i = 0; i < o.lines; i++) {
    const r = rnd();
    const shape: LineShape = r < 0.5 ? 'common' : r < 0.6 ? 'perStep' : r < 0.8 ? 'stage' : 'choice';
    const id = `l${i + 1}`;
    const base = {
      id,
      rev: 1,
      position: i + 1,
      designators: `X${i + 1}`,
      appliesWhen: '',
      category: 'electronics' as const,
    };
    if (shape === 'common' || shape === 'perStep') {
      const p = newPart();
      const qty = int(1, 3);
      const qtyRule = shape === 'perStep' ? 'steps' : String(qty);
      lines.push({ ...base, partId: p.id, qtyRule });
      deciders.push((v) => ({ partId: p.id, qty: shape === 'perStep' ? Number(v.params['steps']) : qty, applies: true }));
    } else if (shape === 'stage') {
      const p = newPart();
      const stage = pick(STAGES);
      lines.push({ ...base, partId: p.id, qtyRule: '1', appliesWhen: `stage="${stage}"` });
      deciders.push((v) => ({ partId: p.id, qty: 1, applies: v.params['stage'] === stage }));
    } else {
      const small = newPart();
      const big = newPart();
      lines.push({ ...base, partRule: `IF(load_w>=100, "${big.mpn}", "${small.mpn}")`, qtyRule: '1' });
      deciders.push((v) => ({ partId: Number(v.params['load_w']) >= 100 ? big.id : small.id, qty: 1, applies: true }));
    }
  }

  const resolution = new Map<string, ResolvedLine[]>();
  for (const v of variants) {
    resolution.set(
      v.id,
      lines.map((l, i) => {
        const d = deciders[i]!(v);
        return d.applies ? { lineId: l.id, partId: d.partId, qtyPerUnit: d.qty, applies: true } : { lineId: l.id, partId: d.partId, qtyPerUnit: 0, applies: false };
      }),
    );
  }

  const book: Book = {
    format: BOOK_FORMAT,
    version: BOOK_VERSION,
    settings,
    parts,
    suppliers,
    quotes,
    variants,
    buildLines: lines,
    checks: [],
    runs: [],
    importBatches: [],
    pages: [],
  };
  return { book, resolution };
}

// The demo Book: an invented maker of wall-box fan speed regulators, its suppliers, parts, quotes, variants and
// family BOM. Every firm, maker, part number and price here is invented; none is a check value for any test.
import type {
  Book,
  BuildLine,
  CostCategory,
  NotebookPage,
  Part,
  PriceBreak,
  PriceList,
  Quote,
  Run,
  Settings,
  Supplier,
  Variant,
} from './book.ts';
import { BOOK_FORMAT, BOOK_VERSION } from './book.ts';

/** Date the demo's quotes are judged against, so the one expired quote shows as expired on any machine. */
const COSTING_DATE = '2026-10-01';

function settings(): Settings {
  return {
    id: 'settings',
    rev: 1,
    bookName: 'Tarnwick wall regulators 2026',
    company: 'Tarnwick Air Controls (invented demo firm)',
    // Invented address: no such street or town.
    shipTo: 'Tarnwick Air Controls, goods in\nUnit 7, Fennick Yard\nHollowmere HX9 4ZZ',
    baseCurrency: 'EUR',
    // Units of EUR for one unit of each currency.
    rates: { EUR: 1, USD: 0.92, GBP: 1.17 },
    runSizes: [500, 2000, 10000],
    orderPrefix: 'TAC-',
    nextOrderNumber: 1,
    kittingDays: 5,
    safetyDays: 3,
    horizonDays: 120,
    stockValuation: 'lastPaid',
    labourRatePerHour: 24,
    labourMinutesPerUnit: 6,
    labourMinutesPerPlacement: 0.08,
    testCostPerUnit: 0.35,
    overheadPct: 18,
    marginPct: 30,
    // Fractions. Chip passives 1–2 %, larger parts 0.5–1 %, ICs a few spares per run
    // (attrition allowances: common practice).
    attrition: {
      resistor: 0.02,
      capacitor: 0.015,
      diode: 0.01,
      zener: 0.01,
      bridge: 0.005,
      mosfet: 0.005,
      triac: 0.005,
      ic: 0.003,
      switch: 0.005,
      connector: 0.005,
      fuse: 0.01,
      varistor: 0.01,
      inductor: 0.005,
      pcb: 0.01,
      enclosure: 0.01,
      heatsink: 0.005,
      hardware: 0.02,
      default: 0.01,
    },
    costingDate: COSTING_DATE,
  };
}

function suppliers(): Supplier[] {
  // Invented addresses and terms, printed on the orders sent to them: no such streets or towns.
  const s = (id: string, name: string, currency: string, notes: string, address: string, paymentTerms: string): Supplier => ({
    id,
    rev: 1,
    name,
    currency,
    notes,
    address,
    paymentTerms,
  });
  return [
    s('sup_halvern', 'Halvern Component Supply', 'EUR', 'Broad-line distributor; cut tape from 10 pieces, next-day to the works.', 'Halvern Component Supply\nOrder desk\n14 Brackwater Lane\nHalvern HV2 8QQ', '30 days net'),
    s('sup_kelvaro', 'Kelvaro Parts Direct', 'USD', 'Semiconductors and ICs; quotes in USD, ships in 4–8 weeks.', 'Kelvaro Parts Direct\nExport sales\n2200 Orrin Flats Road\nPellham Bay', 'payment in advance by bank transfer'),
    // Invented landed terms: parcels from abroad with import duty and a bank charge per payment, and a board maker
    // whose carriage is a share of the order.
    {
      ...s('sup_brindle', 'Brindlecote Electronics', 'GBP', 'Passives and electromechanical parts; price lists per 100 for resistors.', 'Brindlecote Electronics\nSales office\n3 Wickham Rise\nBrindlecote BC4 1XQ', '30 days end of month'),
      freightPerOrder: { amount: 25, currency: 'GBP' },
      dutyPct: 2.7,
      chargesPerOrder: { amount: 6, currency: 'EUR' },
    },
    s('sup_nebrin', 'Nebrin Plastics', 'EUR', 'Moulds our wall-box fronts, knobs and button caps; tooling already paid.', 'Nebrin Plastics\nMoulding works\nPlot 22, Saltings Road\nNebrin NB7 3WW', '45 days net'),
    { ...s('sup_ostrel', 'Ostrel Boards', 'EUR', 'Bare boards to our drawings; panelised, 1.6 mm FR-4, 35 µm copper.', 'Ostrel Boards\n9 Copperkiln Way\nOstrel OS1 6YY', '50 % with order, balance 30 days net'), freightPct: 1.5 },
    s('sup_yarvelle', 'Yarvelle Packaging', 'EUR', 'Printed retail boxes and instruction leaflets.', 'Yarvelle Packaging\n41 Ledger Street\nYarvelle YV3 0ZZ', '30 days net'),
  ];
}

// Invented makers.
const ARDENVALE = 'Ardenvale Passives';
const CORRITH = 'Corrith Capacitor Works';
const QUARNEX = 'Quarnex Semiconductor';
const VELMORA = 'Velmora Logic';
const TESSICK = 'Tessick Electromech';
const OSKARN = 'Oskarn Thermal';
const NEBRIN = 'Nebrin Plastics';
const QUILLOW = 'Quillow Fixings';
const OSTREL = 'Ostrel Boards';
const YARVELLE = 'Yarvelle Packaging';
const TARNWICK = 'Tarnwick Air Controls';
const FERROWEN = 'Ferrowen Semiconductor';

/** A demo part as written below: a Part without its revision, placements always given. */
type PartRow = Omit<Part, 'rev' | 'placements'> & {
  /** Placements for labour; 0 for parts fitted by hand outside the board (enclosure, screws, packaging). */
  placements: number;
};

function part(r: PartRow): Part {
  const p: Part = {
    id: r.id,
    rev: 1,
    mpn: r.mpn,
    maker: r.maker,
    description: r.description,
    kind: r.kind,
    ratings: { ...r.ratings },
    package: r.package,
    placements: r.placements,
  };
  if (r.value !== undefined) p.value = r.value;
  if (r.unit !== undefined) p.unit = r.unit;
  if (r.notes !== undefined) p.notes = r.notes;
  return p;
}

/** A 0603 thick-film chip resistor, 1 %, 0.1 W, 75 V. */
function chipR(id: string, mpn: string, ohms: number, text: string): Part {
  return part({
    id,
    mpn,
    maker: ARDENVALE,
    description: `Chip resistor ${text} ±1 % 0.1 W`,
    kind: 'resistor',
    value: ohms,
    unit: 'Ω',
    ratings: { p_max: 0.1, v_max: 75, tol: 0.01 },
    package: '0603',
    placements: 1,
  });
}

/**
 * The chip resistors the family uses, by value. The ladder, timing and debounce lines pick from this table by the
 * variant's parameter, so a new variant only needs values that appear here.
 */
const CHIP_RESISTORS: readonly (readonly [number, string, string, string])[] = [
  // [ohms, id, maker part number, text]
  [100, 'part_r_100r', 'AV-R06-100R', '100 Ω'],
  [330, 'part_r_330r', 'AV-R06-330R', '330 Ω'],
  [1_000, 'part_r_1k0', 'AV-R06-1K0', '1.0 kΩ'],
  [2_200, 'part_r_2k2', 'AV-R06-2K2', '2.2 kΩ'],
  [2_700, 'part_r_2k7', 'AV-R06-2K7', '2.7 kΩ'],
  [3_300, 'part_r_3k3', 'AV-R06-3K3', '3.3 kΩ'],
  [3_900, 'part_r_3k9', 'AV-R06-3K9', '3.9 kΩ'],
  [4_700, 'part_r_4k7', 'AV-R06-4K7', '4.7 kΩ'],
  [5_600, 'part_r_5k6', 'AV-R06-5K6', '5.6 kΩ'],
  [6_800, 'part_r_6k8', 'AV-R06-6K8', '6.8 kΩ'],
  [8_200, 'part_r_8k2', 'AV-R06-8K2', '8.2 kΩ'],
  [10_000, 'part_r_10k', 'AV-R06-10K', '10 kΩ'],
  [12_000, 'part_r_12k', 'AV-R06-12K', '12 kΩ'],
  [15_000, 'part_r_15k', 'AV-R06-15K', '15 kΩ'],
  [18_000, 'part_r_18k', 'AV-R06-18K', '18 kΩ'],
  [22_000, 'part_r_22k', 'AV-R06-22K', '22 kΩ'],
  [47_000, 'part_r_47k', 'AV-R06-47K', '47 kΩ'],
  [56_000, 'part_r_56k', 'AV-R06-56K', '56 kΩ'],
  [100_000, 'part_r_100k', 'AV-R06-100K', '100 kΩ'],
];

function parts(): Part[] {
  return [
    ...CHIP_RESISTORS.map(([ohms, id, mpn, text]) => chipR(id, mpn, ohms, text)),
    // Resistors that see mains: axial parts for their voltage rating.
    part({ id: 'part_r_bleed_220k', mpn: 'AV-MF50-220K', maker: ARDENVALE, description: 'Metal film resistor 220 kΩ ±1 % 0.5 W 500 V, bleeder', kind: 'resistor', value: 220e3, unit: 'Ω', ratings: { p_max: 0.5, v_max: 500, tol: 0.01 }, package: 'axial 0207', placements: 1 }),
    part({ id: 'part_r_bleed_470k', mpn: 'AV-MF50-470K', maker: ARDENVALE, description: 'Metal film resistor 470 kΩ ±1 % 0.5 W 500 V, bleeder', kind: 'resistor', value: 470e3, unit: 'Ω', ratings: { p_max: 0.5, v_max: 500, tol: 0.01 }, package: 'axial 0207', placements: 1 }),
    part({ id: 'part_r_bleed_1m0', mpn: 'AV-MF50-1M0', maker: ARDENVALE, description: 'Metal film resistor 1.0 MΩ ±1 % 0.5 W 500 V', kind: 'resistor', value: 1e6, unit: 'Ω', ratings: { p_max: 0.5, v_max: 500, tol: 0.01 }, package: 'axial 0207', placements: 1 }),
    part({ id: 'part_r_drop_100r', mpn: 'AV-FR1W-100R', maker: ARDENVALE, description: 'Fusible resistor 100 Ω ±5 % 1 W, dropper inrush limiter', kind: 'resistor', value: 100, unit: 'Ω', ratings: { p_max: 1, v_max: 350, tol: 0.05 }, package: 'axial 0411', placements: 1 }),
    part({ id: 'part_r_snub_100r', mpn: 'AV-MO2W-100R', maker: ARDENVALE, description: 'Metal oxide resistor 100 Ω ±5 % 2 W 500 V, snubber', kind: 'resistor', value: 100, unit: 'Ω', ratings: { p_max: 2, v_max: 500, tol: 0.05 }, package: 'axial 0617', placements: 1 }),

    // X2 dropper capacitors, 275 V AC.
    part({ id: 'part_xcap_220n', mpn: 'CW-X2-224-275', maker: CORRITH, description: 'X2 film capacitor 0.22 µF ±10 % 275 V AC', kind: 'capacitor', value: 0.22e-6, unit: 'F', ratings: { v_ac: 275, v_max: 630, v_pulse: 2500, tol: 0.1 }, package: 'radial P15', placements: 1 }),
    part({ id: 'part_xcap_330n', mpn: 'CW-X2-334-275', maker: CORRITH, description: 'X2 film capacitor 0.33 µF ±10 % 275 V AC', kind: 'capacitor', value: 0.33e-6, unit: 'F', ratings: { v_ac: 275, v_max: 630, v_pulse: 2500, tol: 0.1 }, package: 'radial P15', placements: 1 }),
    part({ id: 'part_xcap_470n', mpn: 'CW-X2-474-275', maker: CORRITH, description: 'X2 film capacitor 0.47 µF ±10 % 275 V AC', kind: 'capacitor', value: 0.47e-6, unit: 'F', ratings: { v_ac: 275, v_max: 630, v_pulse: 2500, tol: 0.1 }, package: 'radial P15', placements: 1 }),
    part({ id: 'part_xcap_680n', mpn: 'CW-X2-684-275', maker: CORRITH, description: 'X2 film capacitor 0.68 µF ±10 % 275 V AC', kind: 'capacitor', value: 0.68e-6, unit: 'F', ratings: { v_ac: 275, v_max: 630, v_pulse: 2500, tol: 0.1 }, package: 'radial P22.5', placements: 1 }),
    // Small capacitors.
    part({ id: 'part_c_10n', mpn: 'CW-C06-103-50', maker: CORRITH, description: 'Chip capacitor 10 nF ±5 % 50 V C0G, astable timing', kind: 'capacitor', value: 10e-9, unit: 'F', ratings: { v_max: 50, tol: 0.05 }, package: '0603', placements: 1 }),
    part({ id: 'part_c_100n', mpn: 'CW-C06-104-50', maker: CORRITH, description: 'Chip capacitor 100 nF ±10 % 50 V X7R', kind: 'capacitor', value: 100e-9, unit: 'F', ratings: { v_max: 50, tol: 0.1 }, package: '0603', placements: 1 }),
    part({ id: 'part_c_470u', mpn: 'CW-E477-25', maker: CORRITH, description: 'Aluminium electrolytic 470 µF ±20 % 25 V 105 °C', kind: 'capacitor', value: 470e-6, unit: 'F', ratings: { v_max: 25, tol: 0.2 }, package: 'radial 8×12', placements: 1 }),
    part({ id: 'part_c_470u_50', mpn: 'CW-E477-50', maker: CORRITH, description: 'Aluminium electrolytic 470 µF ±20 % 50 V 105 °C', kind: 'capacitor', value: 470e-6, unit: 'F', ratings: { v_max: 50, tol: 0.2 }, package: 'radial 10×16', placements: 1 }),
    part({ id: 'part_snub_2n2', mpn: 'CW-F222-630', maker: CORRITH, description: 'Film capacitor 2.2 nF ±10 % 630 V DC, snubber', kind: 'capacitor', value: 2.2e-9, unit: 'F', ratings: { v_max: 630, tol: 0.1 }, package: 'radial P10', placements: 1 }),
    part({ id: 'part_snub_10n', mpn: 'CW-F103-630', maker: CORRITH, description: 'Film capacitor 10 nF ±10 % 630 V DC, snubber', kind: 'capacitor', value: 10e-9, unit: 'F', ratings: { v_max: 630, tol: 0.1 }, package: 'radial P10', placements: 1 }),

    // Diodes.
    part({ id: 'part_zener_12v_05', mpn: 'QX-Z12-05', maker: QUARNEX, description: 'Zener diode 12 V ±5 % 0.5 W', kind: 'zener', value: 12, unit: 'V', ratings: { p_max: 0.5, tol: 0.05 }, package: 'SOD-80', placements: 1 }),
    part({ id: 'part_zener_12v_13', mpn: 'QX-Z12-13', maker: QUARNEX, description: 'Zener diode 12 V ±5 % 1.3 W', kind: 'zener', value: 12, unit: 'V', ratings: { p_max: 1.3, tol: 0.05 }, package: 'DO-41', placements: 1 }),
    part({ id: 'part_zener_15v_13', mpn: 'QX-Z15-13', maker: QUARNEX, description: 'Zener diode 15 V ±5 % 1.3 W', kind: 'zener', value: 15, unit: 'V', ratings: { p_max: 1.3, tol: 0.05 }, package: 'DO-41', placements: 1 }),
    part({ id: 'part_diode_1a', mpn: 'QX-D1K0-1', maker: QUARNEX, description: 'Rectifier diode 1000 V 1 A', kind: 'diode', ratings: { v_max: 1000, i_max: 1, vf: 1.1 }, package: 'DO-41', placements: 1 }),
    // An approved second source of the supply diode (line D2): same ratings, dearer, but three days away.
    part({ id: 'part_diode_1a_fw', mpn: 'FW-R1000-1', maker: FERROWEN, description: 'Rectifier diode 1000 V 1 A, second source', kind: 'diode', ratings: { v_max: 1000, i_max: 1, vf: 1.1 }, package: 'DO-41', placements: 1 }),
    part({ id: 'part_diode_sig', mpn: 'QX-S100-02', maker: QUARNEX, description: 'Small-signal diode 100 V 0.2 A, step steering', kind: 'diode', ratings: { v_max: 100, i_max: 0.2, vf: 1 }, package: 'SOD-323', placements: 1 }),
    part({ id: 'part_bridge_1a', mpn: 'QX-B06-1', maker: QUARNEX, description: 'Bridge rectifier 600 V 1 A', kind: 'bridge', ratings: { v_max: 600, i_max: 1, vf: 1, i2t: 5 }, package: 'MBS-4', placements: 1 }),
    part({ id: 'part_bridge_1a_1kv', mpn: 'QX-B10-1', maker: QUARNEX, description: 'Bridge rectifier 1000 V 1 A', kind: 'bridge', ratings: { v_max: 1000, i_max: 1, vf: 1, i2t: 5 }, package: 'MBS-4', placements: 1 }),
    part({ id: 'part_bridge_2a', mpn: 'QX-B10-2', maker: QUARNEX, description: 'Bridge rectifier 1000 V 2 A', kind: 'bridge', ratings: { v_max: 1000, i_max: 2, vf: 1.05, i2t: 15 }, package: 'DB-4', placements: 1 }),

    // Power switches.
    part({ id: 'part_fet_600v_2a', mpn: 'QX-N6002', maker: QUARNEX, description: 'N-channel MOSFET 600 V 2 A, 3.6 Ω', kind: 'mosfet', ratings: { v_max: 600, i_max: 2, rds_on: 3.6, vgs_full: 10, rth_jc: 3.5, tj_max: 150, p_max: 50 }, package: 'TO-220', placements: 1 }),
    part({ id: 'part_fet_600v_4a', mpn: 'QX-N6004', maker: QUARNEX, description: 'N-channel MOSFET 600 V 4 A, 1.2 Ω', kind: 'mosfet', ratings: { v_max: 600, i_max: 4, rds_on: 1.2, vgs_full: 10, rth_jc: 2.5, tj_max: 150, p_max: 75 }, package: 'TO-220', placements: 1 }),
    part({ id: 'part_fet_800v_3a', mpn: 'QX-N8003', maker: QUARNEX, description: 'N-channel MOSFET 800 V 3 A, 2.2 Ω', kind: 'mosfet', ratings: { v_max: 800, i_max: 3, rds_on: 2.2, vgs_full: 10, rth_jc: 2, tj_max: 150, p_max: 90 }, package: 'TO-220', placements: 1 }),
    part({ id: 'part_fet_800v_6a', mpn: 'QX-N8006', maker: QUARNEX, description: 'N-channel MOSFET 800 V 6 A, 0.9 Ω', kind: 'mosfet', ratings: { v_max: 800, i_max: 6, rds_on: 0.9, vgs_full: 10, rth_jc: 1.2, tj_max: 150, p_max: 125 }, package: 'TO-220', placements: 1 }),
    part({ id: 'part_triac_600v_4a', mpn: 'QX-T6004', maker: QUARNEX, description: 'Triac 600 V 4 A, sensitive gate 10 mA (5 mA in quadrants I–III)', kind: 'triac', ratings: { v_max: 600, i_max: 4, vf: 1.5, rth_jc: 3.3, tj_max: 125, vt0: 0.95, rt: 0.09, igt: 0.005, igt_q4: 0.01, vgt: 1, il: 0.015, ih: 0.01, didt_c: 1800, i2t: 4.5 }, package: 'TO-220', placements: 1 }),

    // ICs.
    part({ id: 'part_timer', mpn: 'VL-AST8-C', maker: VELMORA, description: 'CMOS 555-type timer, 2–18 V supply', kind: 'ic', ratings: { v_min: 2, v_max: 18, r_ctl: 200e3 / 3, v_oh_drop: 0.1 }, package: 'SO-8', placements: 1, notes: 'Internal divider 3 × 100 kΩ, so the control pin sits behind 100 kΩ ∥ 200 kΩ = 66.7 kΩ (r_ctl); the CMOS output swings to within 0.1 V of the supply.' }),
    part({ id: 'part_counter', mpn: 'VL-DC10-S16', maker: VELMORA, description: 'CMOS decade counter with ten decoded outputs, 3–18 V', kind: 'ic', ratings: { v_min: 3, v_max: 18 }, package: 'SO-16', placements: 1 }),
    part({ id: 'part_mcu', mpn: 'VL-M8F2-S8', maker: VELMORA, description: '8-bit microcontroller, 2 kB flash, 8 pins, 1.8–5.5 V', kind: 'ic', ratings: { v_min: 1.8, v_max: 5.5 }, package: 'SO-8', placements: 1 }),
    part({ id: 'part_reg_12v', mpn: 'VL-LR12-T3', maker: VELMORA, description: 'Linear regulator 12 V ±4 % 100 mA', kind: 'ic', value: 12, unit: 'V', ratings: { v_max: 35, i_max: 0.1, p_max: 0.625, v_drop: 1.7, tol: 0.04 }, package: 'TO-92', placements: 1 }),
    part({ id: 'part_reg_5v', mpn: 'VL-LR05-T3', maker: VELMORA, description: 'Linear regulator 5 V ±4 % 100 mA', kind: 'ic', value: 5, unit: 'V', ratings: { v_max: 30, i_max: 0.1, p_max: 0.625, v_drop: 1.7, tol: 0.04 }, package: 'TO-92', placements: 1 }),

    // Electromechanical and protection.
    part({ id: 'part_button', mpn: 'TK-PB6-TH', maker: TESSICK, description: 'Tactile push button 6 mm, 24 V 50 mA', kind: 'switch', ratings: { v_max: 24, i_max: 0.05 }, package: 'THT 6×6', placements: 1 }),
    part({ id: 'part_rotary', mpn: 'TK-RS1P6', maker: TESSICK, description: 'Rotary switch 1 pole 6 positions, 50 V 150 mA', kind: 'switch', ratings: { v_max: 50, i_max: 0.15 }, package: 'panel, PCB pins', placements: 1 }),
    part({ id: 'part_terminal', mpn: 'TK-TB3-508', maker: TESSICK, description: 'Screw terminal block 3-way, 5.08 mm, 400 V 10 A', kind: 'connector', ratings: { v_max: 400, i_max: 10 }, package: 'THT 5.08', placements: 1 }),
    part({ id: 'part_fuse_1a6', mpn: 'TK-F160T', maker: TESSICK, description: 'Fuse 1.6 A time-lag, 250 V AC, radial', kind: 'fuse', value: 1.6, unit: 'A', ratings: { i_max: 1.6, v_ac: 250, i2t: 3.2 }, package: 'radial TR5', placements: 1 }),
    part({ id: 'part_fuse_3a15', mpn: 'TK-F315T', maker: TESSICK, description: 'Fuse 3.15 A time-lag, 250 V AC, radial', kind: 'fuse', value: 3.15, unit: 'A', ratings: { i_max: 3.15, v_ac: 250, i2t: 11 }, package: 'radial TR5', placements: 1 }),
    part({ id: 'part_fuse_2a_f', mpn: 'TK-F200F', maker: TESSICK, description: 'Fuse 2 A quick-acting, 250 V AC, radial', kind: 'fuse', value: 2, unit: 'A', ratings: { i_max: 2, v_ac: 250, i2t: 1.8 }, package: 'radial TR5', placements: 1 }),
    part({ id: 'part_fuse_63ma', mpn: 'TK-F063T', maker: TESSICK, description: 'Fuse 63 mA time-lag, 250 V AC, radial', kind: 'fuse', value: 0.063, unit: 'A', ratings: { i_max: 0.063, v_ac: 250 }, package: 'radial TR5', placements: 1 }),
    part({ id: 'part_vdr_275', mpn: 'TK-V275-07', maker: TESSICK, description: 'Varistor 275 V AC, 7 mm disc', kind: 'varistor', ratings: { v_ac: 275, v_1ma: 430, v_clamp: 710, i_clamp: 10, i_surge: 1200, energy: 23 }, package: 'disc 7 mm', placements: 1 }),
    part({ id: 'part_vdr_275_20', mpn: 'TK-V275-20', maker: TESSICK, description: 'Varistor 275 V AC, 20 mm disc', kind: 'varistor', ratings: { v_ac: 275, v_1ma: 430, v_clamp: 700, i_clamp: 100, i_surge: 8000, energy: 150 }, package: 'disc 20 mm', placements: 1 }),
    part({ id: 'part_vdr_150', mpn: 'TK-V150-07', maker: TESSICK, description: 'Varistor 150 V AC, 7 mm disc', kind: 'varistor', ratings: { v_ac: 150, v_1ma: 240, v_clamp: 395, i_clamp: 10, i_surge: 1200, energy: 11 }, package: 'disc 7 mm', placements: 1 }),
    part({ id: 'part_xfmr_230', mpn: 'TK-TR230-12', maker: TESSICK, description: 'PCB transformer 230 V to 12 V AC, 1.5 VA', kind: 'inductor', value: 12, unit: 'V', ratings: { v_ac: 230, p_max: 1.5, i_max: 0.125, regulation: 0.25 }, package: 'EI30 PCB', placements: 1 }),
    part({ id: 'part_xfmr_230_15', mpn: 'TK-TR230-15', maker: TESSICK, description: 'PCB transformer 230 V to 15 V AC, 1.5 VA', kind: 'inductor', value: 15, unit: 'V', ratings: { v_ac: 230, p_max: 1.5, i_max: 0.1, regulation: 0.25 }, package: 'EI30 PCB', placements: 1 }),
    part({ id: 'part_xfmr_120', mpn: 'TK-TR120-12', maker: TESSICK, description: 'PCB transformer 120 V to 12 V AC, 1.5 VA', kind: 'inductor', value: 12, unit: 'V', ratings: { v_ac: 120, p_max: 1.5, i_max: 0.125, regulation: 0.25 }, package: 'EI30 PCB', placements: 1 }),
    part({ id: 'part_xfmr_120_9', mpn: 'TK-TR120-09', maker: TESSICK, description: 'PCB transformer 120 V to 9 V AC, 1.5 VA', kind: 'inductor', value: 9, unit: 'V', ratings: { v_ac: 120, p_max: 1.5, i_max: 0.167, regulation: 0.25 }, package: 'EI30 PCB', placements: 1 }),

    // Thermal. The heatsinks carry the interface resistance of the pad fitted with them, so a check can read both.
    part({ id: 'part_sink_20', mpn: 'OK-HS20-T220', maker: OSKARN, description: 'Clip-on heatsink for TO-220, 20 K/W', kind: 'heatsink', ratings: { rth_sa: 20, rth_cs: 1 }, package: 'TO-220 clip', placements: 1, notes: 'rth_cs is with the OK-TP-T220 pad.' }),
    part({ id: 'part_sink_8', mpn: 'OK-HS08-T220', maker: OSKARN, description: 'Extruded heatsink for TO-220, 8 K/W', kind: 'heatsink', ratings: { rth_sa: 8, rth_cs: 1 }, package: 'TO-220 screw', placements: 1, notes: 'rth_cs is with the OK-TP-T220 pad.' }),
    part({ id: 'part_pad', mpn: 'OK-TP-T220', maker: OSKARN, description: 'Insulating thermal pad for TO-220, 1.0 K/W', kind: 'hardware', ratings: { rth_cs: 1 }, package: 'TO-220 pad', placements: 1 }),

    // Board, enclosure, hardware, packaging.
    part({ id: 'part_pcb_a3', mpn: 'TW-PCB-A3', maker: OSTREL, description: 'Control board for button and microcontroller variants, rev A3', kind: 'pcb', ratings: {}, package: '62×48 mm', placements: 0, notes: `Our own design (${TARNWICK}).` }),
    part({ id: 'part_pcb_r2', mpn: 'TW-PCB-R2', maker: OSTREL, description: 'Control board for rotary variants, rev R2', kind: 'pcb', ratings: {}, package: '62×48 mm', placements: 0, notes: `Our own design (${TARNWICK}).` }),
    part({ id: 'part_box_w', mpn: 'NB-WB86-W', maker: NEBRIN, description: 'Wall-box front and back, 86 mm, white, up to 100 W', kind: 'enclosure', ratings: {}, package: '86×86 mm', placements: 0 }),
    part({ id: 'part_box_l', mpn: 'NB-WB86-L', maker: NEBRIN, description: 'Wall-box front and back, 86 mm, vented, deep, over 100 W', kind: 'enclosure', ratings: {}, package: '86×86×38 mm', placements: 0 }),
    part({ id: 'part_knob', mpn: 'NB-KN22-W', maker: NEBRIN, description: 'Knob 22 mm for rotary switch, white', kind: 'enclosure', ratings: {}, package: 'D-shaft 6 mm', placements: 0 }),
    part({ id: 'part_button_cap', mpn: 'NB-BC12-W', maker: NEBRIN, description: 'Button cap 12 mm with step window, white', kind: 'enclosure', ratings: {}, package: 'snap-fit', placements: 0 }),
    part({ id: 'part_screw_m3', mpn: 'QF-M3X8-PZ', maker: QUILLOW, description: 'Screw M3×8 pan head, zinc plated', kind: 'hardware', ratings: {}, package: 'bulk', placements: 0 }),
    part({ id: 'part_screw_wall', mpn: 'QF-M35X25-PZ', maker: QUILLOW, description: 'Screw M3.5×25 for wall-box fixing', kind: 'hardware', ratings: {}, package: 'bulk', placements: 0 }),
    part({ id: 'part_carton', mpn: 'YP-BX-120', maker: YARVELLE, description: 'Printed retail box 120×120×50 mm', kind: 'other', ratings: {}, package: 'flat', placements: 0 }),
    part({ id: 'part_leaflet', mpn: 'YP-LF-A5', maker: YARVELLE, description: 'Instruction leaflet A5 with the mains wiring caution', kind: 'other', ratings: {}, package: 'folded', placements: 0 }),
  ];
}

/**
 * Variants. Component values are on E12 (IEC 60063). The stepped divider is r_top over the step resistor of the
 * selected step, feeding the timer's control pin: a larger step resistor gives a higher control voltage and so a
 * longer high time (textbook 555-type astable with the control pin held, from memory).
 */
function variants(): Variant[] {
  const v = (id: string, code: string, name: string, params: Variant['params'], notes: string): Variant => ({
    id,
    rev: 1,
    code,
    name,
    params: { ...params },
    notes,
  });
  // Shared values: mains 230 V ±10 % 50 Hz or 120 V ±10 % 60 Hz; astable RA 4.7 kΩ, RB 47 kΩ, C 10 nF runs at
  // roughly 1–3 kHz over the step range; debounce 100 kΩ × 100 nF reaches half the supply in 6.9 ms.
  // Every installation is taken to see the 1 kV line-to-line surge of IEC 61000-4-5 (surge_v).
  const eu = { mains_v: 230, mains_hz: 50, mains_tol: 0.1, surge_v: 1000 };
  const us = { mains_v: 120, mains_hz: 60, mains_tol: 0.1, surge_v: 1000 };
  const astable = { ra: 4_700, rb: 47_000, c_t: 10e-9, r_top: 10_000, f_pwm_min: 500, f_pwm_max: 5_000 };
  const debounce = { r_db: 100_000, c_db: 100e-9, t_bounce: 0.005 };
  // Ladders keep adjacent step duties at least 5 points apart (the duty_step_gap check in sheets/40-control.checks).
  // They were laid out for a bipolar timer's 3.33 kΩ control pin; on the CMOS timer fitted (66.7 kΩ) the five- and
  // six-step ladders' closest steps come 5.5 points apart, inside the check's margin band.
  const ladder3 = { r_s1: 4_700, r_s2: 15_000, r_s3: 47_000 };
  const ladder4 = { r_s1: 3_300, r_s2: 6_800, r_s3: 12_000, r_s4: 47_000 };
  const ladder5 = { r_s1: 2_200, r_s2: 3_300, r_s3: 5_600, r_s4: 10_000, r_s5: 47_000 };
  const ladder6 = { r_s1: 1_000, r_s2: 2_200, r_s3: 3_300, r_s4: 5_600, r_s5: 10_000, r_s6: 47_000 };
  return [
    // Sound: small exhaust fan, the cheapest member; 0.33 µF dropper with 12 V zener.
    v('variant_fr3_40_cd', 'FR3-40-CD', 'Three-step 40 W, push button, dropper', {
      steps: 3, load_w: 40, pf: 0.9, ...eu, t_amb: 45, selector: 'button', stage: 'mosfet', supply: 'dropper',
      vcc: 11.3, i_logic: 0.003, c_drop: 0.33e-6, c_drop_tol: 0.1, r_bleed: 470e3, v_z: 12,
      ...astable, ...ladder3, ...debounce, snub_c: 2.2e-9,
    }, 'Sound on every check: the reference member of the family.'),
    // Sound: table fan; 15 V zener so the 1.3 W part is chosen.
    v('variant_fr4_60_cd', 'FR4-60-CD', 'Four-step 60 W, push button, dropper', {
      steps: 4, load_w: 60, pf: 0.9, ...eu, t_amb: 45, selector: 'button', stage: 'mosfet', supply: 'dropper',
      vcc: 14.3, i_logic: 0.004, c_drop: 0.47e-6, c_drop_tol: 0.1, r_bleed: 470e3, v_z: 15,
      ...astable, ...ladder4, ...debounce, snub_c: 2.2e-9,
    }, 'Sound; the best seller, costed in the spring run.'),
    // FAIL on purpose: 1 MΩ bleeder across 0.47 µF leaves 38.74 V after 1 s, above the 34 V the bleeder check borrows
    // from IEC 60335-1 cl. 22.5 (the regulator's own product standard is IEC 60669-2-1).
    v('variant_fr5_75_cd', 'FR5-75-CD', 'Five-step 75 W, push button, dropper', {
      steps: 5, load_w: 75, pf: 0.9, ...eu, t_amb: 45, selector: 'button', stage: 'mosfet', supply: 'dropper',
      vcc: 14.3, i_logic: 0.004, c_drop: 0.47e-6, c_drop_tol: 0.1, r_bleed: 1e6, v_z: 15,
      ...astable, ...ladder5, ...debounce, snub_c: 2.2e-9,
    }, 'Shows a failing check: the 1 MΩ bleeder discharges the X capacitor too slowly after unplugging.'),
    // MARGIN on purpose: 0.47 µF with a 12 V zener gets the 0.5 W zener; worst-case no-load dissipation 0.23 W
    // doubled for margin is 0.46 W, within 10 % of the rating.
    v('variant_fr6_100_cd', 'FR6-100-CD', 'Six-step 100 W, push button, dropper', {
      steps: 6, load_w: 100, pf: 0.9, ...eu, t_amb: 45, selector: 'button', stage: 'mosfet', supply: 'dropper',
      vcc: 11.3, i_logic: 0.005, c_drop: 0.47e-6, c_drop_tol: 0.1, r_bleed: 470e3, v_z: 12,
      ...astable, ...ladder6, ...debounce, snub_c: 2.2e-9,
    }, 'Shows a margin: the 0.5 W zener is close to twice its worst-case dissipation.'),
    // Sound: ceiling fan, big MOSFET on the 8 K/W heatsink, transformer supply so the dropper checks are n/a.
    v('variant_fr5_150_rt', 'FR5-150-RT', 'Five-step 150 W, rotary switch, transformer', {
      steps: 5, load_w: 150, pf: 0.92, ...eu, t_amb: 50, selector: 'rotary', stage: 'mosfet', supply: 'transformer',
      vcc: 12, i_logic: 0.006, ...astable, ...ladder5, snub_c: 2.2e-9,
    }, 'Sound; dropper and debounce checks do not apply (transformer supply, rotary selector).'),
    // Sound: 120 V 60 Hz market; 0.68 µF dropper with 470 kΩ bleeder.
    v('variant_fr3_60_cd_u', 'FR3-60-CD-U', 'Three-step 60 W, push button, dropper, 120 V', {
      steps: 3, load_w: 60, pf: 0.9, ...us, t_amb: 45, selector: 'button', stage: 'mosfet', supply: 'dropper',
      vcc: 11.3, i_logic: 0.003, c_drop: 0.68e-6, c_drop_tol: 0.1, r_bleed: 470e3, v_z: 12,
      ...astable, ...ladder3, ...debounce, snub_c: 2.2e-9,
    }, 'Sound on 120 V 60 Hz.'),
    // MARGIN on purpose: 10 mA of logic from 0.68 µF at 120 V −10 % and −10 % capacitance leaves under 10 % headroom
    // (half-wave charge balance, about 10.7 mA available).
    v('variant_fr6_75_cd_u', 'FR6-75-CD-U', 'Six-step 75 W, push button, dropper, 120 V', {
      steps: 6, load_w: 75, pf: 0.9, ...us, t_amb: 45, selector: 'button', stage: 'mosfet', supply: 'dropper',
      vcc: 11.3, i_logic: 0.01, c_drop: 0.68e-6, c_drop_tol: 0.1, r_bleed: 470e3, v_z: 12,
      ...astable, ...ladder6, ...debounce, snub_c: 2.2e-9,
    }, 'Shows a margin: the dropper barely supplies the logic at low mains.'),
    // Sound: microcontroller with a triac in phase control; no timer, ladder or counter lines apply.
    v('variant_fr4_100_mt_u', 'FR4-100-MT-U', 'Four-step 100 W, microcontroller, triac, transformer, 120 V', {
      steps: 4, load_w: 100, pf: 0.9, ...us, t_amb: 45, selector: 'mcu', stage: 'triac', supply: 'transformer',
      vcc: 5, i_logic: 0.015, snub_c: 10e-9,
      // Firing angles in rad after each zero crossing, step 1 the slowest; the fan runs down to 55 V.
      alpha_s1: 1.8, alpha_s2: 1.3, alpha_s3: 0.8, alpha_s4: 0.3, fan_v_min: 55, t_amb_min: -10, gate_polarity: 'negative',
    }, 'Sound; the astable, ladder and dropper checks do not apply.'),
  ];
}

/** IF chain choosing a part by a parameter's exact value; "" (no part) when the value has no entry. */
function pickByValue(param: string, table: readonly (readonly [number, string])[]): string {
  let formula = '""';
  for (let i = table.length - 1; i >= 0; i--) {
    const [value, mpn] = table[i]!;
    formula = `IF(${param}=${value}, "${mpn}", ${formula})`;
  }
  return formula;
}

const CHIP_R_BY_VALUE: readonly (readonly [number, string])[] = CHIP_RESISTORS.map(([ohms, , mpn]) => [ohms, mpn] as const);

interface LineRow {
  id: string;
  designators: string;
  category: CostCategory;
  partId?: string;
  partRule?: string;
  qtyRule?: string;
  appliesWhen?: string;
  role?: string;
  /** Approved second sources, best first. */
  alternates?: string[];
  notes?: string;
}

function line(position: number, r: LineRow): BuildLine {
  const l: BuildLine = {
    id: r.id,
    rev: 1,
    position,
    designators: r.designators,
    qtyRule: r.qtyRule ?? '1',
    appliesWhen: r.appliesWhen ?? '',
    category: r.category,
  };
  if (r.partId !== undefined) l.partId = r.partId;
  if (r.partRule !== undefined) l.partRule = r.partRule;
  if (r.role !== undefined) l.role = r.role;
  if (r.alternates !== undefined) l.alternates = r.alternates;
  if (r.notes !== undefined) l.notes = r.notes;
  return l;
}

const TIMER_USED = 'selector<>"mcu"';

function buildLines(): BuildLine[] {
  const rows: LineRow[] = [
    // Mains entry and protection.
    { id: 'line_terminal', designators: 'X1', category: 'power', partId: 'part_terminal' },
    { id: 'line_fuse', designators: 'F1', category: 'power', role: 'fuse', partRule: 'IF(stage="triac", "TK-F200F", IF(load_w/mains_v>0.6, "TK-F315T", "TK-F160T"))', notes: 'Larger fuse where the load current passes about 0.6 A; a quick-acting fuse whose I²t the triac survives.' },
    { id: 'line_varistor', designators: 'RV1', category: 'power', role: 'varistor', partRule: 'IF(mains_v>200, "TK-V275-20", "TK-V150-07")', notes: 'At 230 V the 20 mm disc, which clamps a 1 kV surge under the 800 V switches.' },
    // Power stage.
    { id: 'line_bridge', designators: 'BR1', category: 'power', role: 'bridge', appliesWhen: 'stage="mosfet"', partRule: 'IF(load_w/mains_v>0.45, "QX-B10-2", IF(mains_v>200, "QX-B10-1", "QX-B06-1"))' },
    { id: 'line_mosfet', designators: 'Q1', category: 'power', role: 'switch', appliesWhen: 'stage="mosfet"', partRule: 'IF(load_w>100, "QX-N8006", IF(mains_v>200, "QX-N8003", IF(load_w>60, "QX-N6004", "QX-N6002")))', notes: '800 V at 230 V: the varistor clamps a surge above 600 V.' },
    { id: 'line_triac', designators: 'Q1', category: 'power', role: 'switch', appliesWhen: 'stage="triac"', partId: 'part_triac_600v_4a' },
    { id: 'line_gate_r', designators: 'R1', category: 'power', role: 'gate_r', partRule: 'IF(stage="triac", "AV-R06-330R", "AV-R06-100R")', notes: '330 Ω gives the triac gate about 11 mA from 5 V.' },
    { id: 'line_heatsink', designators: 'HS1', category: 'power', role: 'heatsink', partRule: 'IF(load_w>100, "OK-HS08-T220", "OK-HS20-T220")' },
    { id: 'line_pad', designators: 'HS1', category: 'power', partId: 'part_pad' },
    { id: 'line_snub_r', designators: 'R2', category: 'power', role: 'snubber_r', partId: 'part_r_snub_100r' },
    { id: 'line_snub_c', designators: 'C1', category: 'power', role: 'snubber_c', partRule: 'IF(snub_c>5e-9, "CW-F103-630", "CW-F222-630")' },
    // Logic supply: capacitive dropper.
    { id: 'line_xcap', designators: 'C2', category: 'electronics', role: 'xcap', appliesWhen: 'supply="dropper"', partRule: 'IF(c_drop<0.27e-6, "CW-X2-224-275", IF(c_drop<0.4e-6, "CW-X2-334-275", IF(c_drop<0.57e-6, "CW-X2-474-275", "CW-X2-684-275")))' },
    { id: 'line_bleeder', designators: 'R3', category: 'electronics', role: 'bleeder', appliesWhen: 'supply="dropper"', partRule: 'IF(r_bleed>700000, "AV-MF50-1M0", IF(r_bleed>330000, "AV-MF50-470K", "AV-MF50-220K"))' },
    { id: 'line_drop_r', designators: 'R4', category: 'electronics', appliesWhen: 'supply="dropper"', partId: 'part_r_drop_100r' },
    { id: 'line_zener', designators: 'D1', category: 'electronics', role: 'zener', appliesWhen: 'supply="dropper"', partRule: 'IF(v_z=15, "QX-Z15-13", IF(c_drop>0.5e-6, "QX-Z12-13", "QX-Z12-05"))', notes: 'The 0.5 W zener only below 0.5 µF.' },
    { id: 'line_supply_diode', designators: 'D2', category: 'electronics', role: 'supply_diode', appliesWhen: 'supply="dropper"', partId: 'part_diode_1a', alternates: ['part_diode_1a_fw'] },
    // Logic supply: transformer.
    { id: 'line_xfmr', designators: 'T1', category: 'electronics', role: 'xfmr', appliesWhen: 'supply="transformer"', partRule: 'IF(mains_v>200, IF(vcc>6, "TK-TR230-15", "TK-TR230-12"), IF(vcc>6, "TK-TR120-12", "TK-TR120-09"))', notes: 'A 12 V rail needs a 15 V secondary to stay above the regulator dropout at low mains.' },
    { id: 'line_logic_fuse', designators: 'F2', category: 'electronics', role: 'logic_fuse', appliesWhen: 'supply="transformer"', partId: 'part_fuse_63ma', notes: 'Secondary fuse: the transformer is not short-circuit proof.' },
    { id: 'line_logic_bridge', designators: 'BR2', category: 'electronics', role: 'logic_bridge', appliesWhen: 'supply="transformer"', partId: 'part_bridge_1a' },
    { id: 'line_regulator', designators: 'U3', category: 'electronics', role: 'regulator', appliesWhen: 'supply="transformer"', partRule: 'IF(vcc>6, "VL-LR12-T3", "VL-LR05-T3")' },
    { id: 'line_smoothing', designators: 'C3', category: 'electronics', role: 'smoothing', partRule: 'IF(AND(supply="transformer", vcc>6), "CW-E477-50", "CW-E477-25")', notes: '50 V behind the 15 V transformer, whose no-load peak at high mains passes 25 V.' },
    { id: 'line_decoupling', designators: 'C6, C7', category: 'electronics', partId: 'part_c_100n', qtyRule: 'IF(selector="button", 2, 1)', notes: 'One per IC.' },
    // Control signal: astable and stepped divider.
    { id: 'line_timer', designators: 'U1', category: 'electronics', role: 'timer', appliesWhen: TIMER_USED, partId: 'part_timer' },
    { id: 'line_ra', designators: 'R5', category: 'electronics', appliesWhen: TIMER_USED, partRule: pickByValue('ra', CHIP_R_BY_VALUE) },
    { id: 'line_rb', designators: 'R6', category: 'electronics', appliesWhen: TIMER_USED, partRule: pickByValue('rb', CHIP_R_BY_VALUE) },
    { id: 'line_ct', designators: 'C4', category: 'electronics', appliesWhen: TIMER_USED, partId: 'part_c_10n' },
    { id: 'line_r_top', designators: 'R7', category: 'electronics', appliesWhen: TIMER_USED, partRule: pickByValue('r_top', CHIP_R_BY_VALUE) },
    ...[1, 2, 3, 4, 5, 6].map(
      (k): LineRow => ({
        id: `line_r_s${k}`,
        designators: `R${9 + k}`,
        category: 'electronics',
        appliesWhen: k === 1 ? TIMER_USED : `AND(${TIMER_USED}, steps>=${k})`,
        partRule: pickByValue(`r_s${k}`, CHIP_R_BY_VALUE),
        notes: `Step ${k} resistor of the control-voltage divider.`,
      }),
    ),
    // Speed selection.
    { id: 'line_counter', designators: 'U2', category: 'electronics', role: 'logic', appliesWhen: 'selector="button"', partId: 'part_counter' },
    { id: 'line_steering', designators: 'D3–D8', category: 'electronics', appliesWhen: 'selector="button"', partId: 'part_diode_sig', qtyRule: 'steps', notes: 'One steering diode per step output of the counter.' },
    { id: 'line_r_db', designators: 'R8', category: 'electronics', appliesWhen: 'selector="button"', partRule: pickByValue('r_db', CHIP_R_BY_VALUE) },
    { id: 'line_c_db', designators: 'C5', category: 'electronics', appliesWhen: 'selector="button"', partId: 'part_c_100n' },
    { id: 'line_button', designators: 'SW1', category: 'electronics', appliesWhen: 'OR(selector="button", selector="mcu")', partId: 'part_button' },
    { id: 'line_rotary', designators: 'SW1', category: 'electronics', appliesWhen: 'selector="rotary"', partId: 'part_rotary' },
    { id: 'line_mcu', designators: 'U1', category: 'electronics', role: 'logic', appliesWhen: 'selector="mcu"', partId: 'part_mcu' },
    { id: 'line_zero_cross', designators: 'R9', category: 'electronics', appliesWhen: 'AND(selector="mcu", stage="triac")', partId: 'part_r_bleed_1m0', notes: 'Mains zero-crossing sense into the microcontroller.' },
    // Board, enclosure, hardware, packaging.
    { id: 'line_pcb', designators: 'PCB1', category: 'board', partRule: 'IF(selector="rotary", "TW-PCB-R2", "TW-PCB-A3")' },
    { id: 'line_enclosure', designators: 'ENC1', category: 'enclosure', partRule: 'IF(load_w>100, "NB-WB86-L", "NB-WB86-W")' },
    { id: 'line_knob', designators: 'K1', category: 'enclosure', appliesWhen: 'selector="rotary"', partId: 'part_knob' },
    { id: 'line_button_cap', designators: 'K1', category: 'enclosure', appliesWhen: 'selector<>"rotary"', partId: 'part_button_cap' },
    { id: 'line_screws_m3', designators: 'MH1–MH3', category: 'hardware', partId: 'part_screw_m3', qtyRule: 'IF(load_w>100, 4, 3)', notes: 'Board fixing, plus one for the larger heatsink.' },
    { id: 'line_screws_wall', designators: 'MH4, MH5', category: 'hardware', partId: 'part_screw_wall', qtyRule: '2' },
    { id: 'line_carton', designators: 'PK1', category: 'packaging', partId: 'part_carton' },
    { id: 'line_leaflet', designators: 'PK2', category: 'packaging', partId: 'part_leaflet' },
  ];
  return rows.map((r, i) => line((i + 1) * 10, r));
}

type BreakRow = readonly (readonly [qty: number, price: number])[];

interface QuoteRow {
  part: string;
  supplier: string;
  code: string;
  breaks: BreakRow;
  moq: number;
  pack: number;
  lead: number;
  date: string;
  expires?: string;
  source?: string;
}

function quote(r: QuoteRow, currencyOf: Map<string, string>): Quote {
  const breaks: PriceBreak[] = r.breaks.map(([qty, price]) => ({ qty, price }));
  const q: Quote = {
    id: `quote_${r.supplier.replace(/^sup_/, '')}_${r.part.replace(/^part_/, '')}`,
    rev: 1,
    partId: r.part,
    supplierId: r.supplier,
    supplierCode: r.code,
    currency: currencyOf.get(r.supplier) ?? '',
    breaks,
    moq: r.moq,
    pack: r.pack,
    leadDays: r.lead,
    date: r.date,
    source: r.source ?? 'manual',
  };
  if (r.expires !== undefined) q.expires = r.expires;
  return q;
}

/** Chip resistors from Halvern (EUR, cut tape) and Brindlecote (GBP, per 100, cheaper at volume). */
function chipResistorQuotes(): QuoteRow[] {
  return CHIP_RESISTORS.flatMap(([, id, mpn]): QuoteRow[] => {
    const suffix = mpn.replace(/^AV-R06-/, '');
    return [
      { part: id, supplier: 'sup_halvern', code: `HV-R06${suffix}`, breaks: [[10, 0.02], [100, 0.009], [1000, 0.0035], [5000, 0.0021]], moq: 10, pack: 10, lead: 2, date: '2026-03-02' },
      { part: id, supplier: 'sup_brindle', code: `BE/R0603/${suffix}`, breaks: [[100, 0.006], [1000, 0.0026], [10000, 0.0014]], moq: 100, pack: 100, lead: 10, date: '2026-02-16' },
    ];
  });
}

function quoteRows(): QuoteRow[] {
  const H = 'sup_halvern';
  const K = 'sup_kelvaro';
  const B = 'sup_brindle';
  return [
    ...chipResistorQuotes(),
    // Mains resistors.
    { part: 'part_r_bleed_220k', supplier: H, code: 'HV-MF220K', breaks: [[10, 0.05], [100, 0.03], [1000, 0.018]], moq: 10, pack: 10, lead: 2, date: '2026-03-02' },
    { part: 'part_r_bleed_470k', supplier: H, code: 'HV-MF470K', breaks: [[10, 0.05], [100, 0.03], [1000, 0.018]], moq: 10, pack: 10, lead: 2, date: '2026-03-02' },
    { part: 'part_r_bleed_470k', supplier: B, code: 'BE/MF50/470K', breaks: [[100, 0.025], [1000, 0.014], [5000, 0.011]], moq: 100, pack: 100, lead: 10, date: '2026-02-16' },
    { part: 'part_r_bleed_1m0', supplier: H, code: 'HV-MF1M0', breaks: [[10, 0.05], [100, 0.03], [1000, 0.018]], moq: 10, pack: 10, lead: 2, date: '2026-03-02' },
    { part: 'part_r_drop_100r', supplier: H, code: 'HV-FR100R', breaks: [[10, 0.09], [500, 0.06], [2000, 0.045]], moq: 10, pack: 10, lead: 5, date: '2026-03-02' },
    { part: 'part_r_snub_100r', supplier: H, code: 'HV-MO100R', breaks: [[10, 0.12], [500, 0.08], [2000, 0.062]], moq: 10, pack: 10, lead: 5, date: '2026-03-02' },
    // X capacitors: Halvern's 0.47 µF list is the one where buying up to the next break pays
    // (2,030 needed for 2,000 units: 2,030 × 0.12 = 243.60 against 2,500 × 0.09 = 225.00).
    { part: 'part_xcap_220n', supplier: H, code: 'HV-X2224', breaks: [[1, 0.22], [100, 0.15], [500, 0.11], [1000, 0.088], [2500, 0.066]], moq: 1, pack: 10, lead: 3, date: '2026-04-01' },
    { part: 'part_xcap_330n', supplier: H, code: 'HV-X2334', breaks: [[1, 0.26], [100, 0.17], [500, 0.13], [1000, 0.1], [2500, 0.078]], moq: 1, pack: 10, lead: 3, date: '2026-04-01' },
    { part: 'part_xcap_470n', supplier: H, code: 'HV-X2474', breaks: [[1, 0.3], [100, 0.2], [500, 0.15], [1000, 0.12], [2500, 0.09]], moq: 1, pack: 10, lead: 3, date: '2026-04-01' },
    { part: 'part_xcap_680n', supplier: H, code: 'HV-X2684', breaks: [[1, 0.38], [100, 0.26], [500, 0.2], [1000, 0.16], [2500, 0.125]], moq: 1, pack: 10, lead: 3, date: '2026-04-01' },
    { part: 'part_xcap_220n', supplier: B, code: 'BE/X2/224', breaks: [[50, 0.12], [500, 0.085], [2000, 0.065]], moq: 50, pack: 50, lead: 15, date: '2026-02-16' },
    { part: 'part_xcap_330n', supplier: B, code: 'BE/X2/334', breaks: [[50, 0.13], [500, 0.095], [2000, 0.075]], moq: 50, pack: 50, lead: 15, date: '2026-02-16' },
    { part: 'part_xcap_470n', supplier: B, code: 'BE/X2/474', breaks: [[50, 0.14], [500, 0.11], [2000, 0.1]], moq: 50, pack: 50, lead: 15, date: '2026-02-16' },
    { part: 'part_xcap_680n', supplier: B, code: 'BE/X2/684', breaks: [[50, 0.19], [500, 0.15], [2000, 0.12]], moq: 50, pack: 50, lead: 15, date: '2026-02-16' },
    // Small capacitors.
    { part: 'part_c_10n', supplier: H, code: 'HV-C06103G', breaks: [[10, 0.015], [1000, 0.006], [4000, 0.004]], moq: 10, pack: 10, lead: 2, date: '2026-03-02' },
    { part: 'part_c_100n', supplier: H, code: 'HV-C06104X', breaks: [[10, 0.01], [1000, 0.004], [4000, 0.0025]], moq: 10, pack: 10, lead: 2, date: '2026-03-02' },
    { part: 'part_c_100n', supplier: B, code: 'BE/C0603/104', breaks: [[100, 0.003], [4000, 0.0016]], moq: 100, pack: 100, lead: 10, date: '2026-02-16' },
    { part: 'part_c_470u_50', supplier: H, code: 'HV-E47750', breaks: [[1, 0.19], [200, 0.12], [1000, 0.09]], moq: 1, pack: 50, lead: 3, date: '2026-03-02' },
    { part: 'part_c_470u', supplier: H, code: 'HV-E47725', breaks: [[1, 0.12], [200, 0.07], [1000, 0.052]], moq: 1, pack: 50, lead: 3, date: '2026-03-02' },
    { part: 'part_snub_2n2', supplier: H, code: 'HV-F222630', breaks: [[1, 0.12], [500, 0.075], [2500, 0.055]], moq: 1, pack: 10, lead: 5, date: '2026-03-02' },
    { part: 'part_snub_10n', supplier: H, code: 'HV-F103630', breaks: [[1, 0.14], [500, 0.085], [2500, 0.06]], moq: 1, pack: 10, lead: 5, date: '2026-03-02' },
    // Semiconductors: Kelvaro in USD, some also from Halvern in EUR.
    { part: 'part_zener_12v_05', supplier: K, code: 'KPD-410233', breaks: [[10, 0.045], [1000, 0.021], [10000, 0.012]], moq: 10, pack: 10, lead: 35, date: '2026-05-11' },
    { part: 'part_zener_12v_05', supplier: H, code: 'HV-Z1205', breaks: [[10, 0.05], [500, 0.028], [5000, 0.016]], moq: 10, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_zener_12v_13', supplier: K, code: 'KPD-410251', breaks: [[10, 0.09], [1000, 0.045], [5000, 0.032]], moq: 10, pack: 10, lead: 35, date: '2026-05-11' },
    { part: 'part_zener_15v_13', supplier: K, code: 'KPD-410252', breaks: [[10, 0.09], [1000, 0.045], [5000, 0.032]], moq: 10, pack: 10, lead: 35, date: '2026-05-11' },
    { part: 'part_diode_1a', supplier: K, code: 'KPD-300117', breaks: [[10, 0.04], [1000, 0.018], [10000, 0.011]], moq: 10, pack: 10, lead: 35, date: '2026-05-11' },
    { part: 'part_diode_1a_fw', supplier: H, code: 'HV-FW1K01', breaks: [[10, 0.06], [500, 0.03], [5000, 0.02]], moq: 10, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_diode_sig', supplier: K, code: 'KPD-300402', breaks: [[10, 0.02], [1000, 0.007], [10000, 0.004]], moq: 10, pack: 10, lead: 35, date: '2026-05-11' },
    { part: 'part_bridge_1a_1kv', supplier: K, code: 'KPD-520101', breaks: [[1, 0.24], [500, 0.14], [3000, 0.1]], moq: 1, pack: 50, lead: 42, date: '2026-05-11' },
    { part: 'part_bridge_1a', supplier: K, code: 'KPD-520061', breaks: [[1, 0.21], [500, 0.12], [3000, 0.085]], moq: 1, pack: 50, lead: 42, date: '2026-05-11' },
    { part: 'part_bridge_1a', supplier: H, code: 'HV-B061', breaks: [[1, 0.24], [100, 0.15], [1000, 0.11]], moq: 1, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_bridge_2a', supplier: K, code: 'KPD-520102', breaks: [[1, 0.34], [500, 0.21], [3000, 0.16]], moq: 1, pack: 50, lead: 42, date: '2026-05-11' },
    { part: 'part_fet_600v_2a', supplier: K, code: 'KPD-700602', breaks: [[1, 0.62], [100, 0.48], [1000, 0.39], [5000, 0.33]], moq: 1, pack: 50, lead: 28, date: '2026-05-11' },
    { part: 'part_fet_600v_2a', supplier: H, code: 'HV-N6002', breaks: [[1, 0.7], [250, 0.52], [1000, 0.41]], moq: 1, pack: 50, lead: 3, date: '2026-03-02' },
    // Kelvaro's cheaper 4 A MOSFET quote ran out at the end of June; costing must fall back to Halvern.
    { part: 'part_fet_600v_4a', supplier: K, code: 'KPD-700604', breaks: [[1, 0.78], [100, 0.61], [1000, 0.49]], moq: 1, pack: 50, lead: 28, date: '2026-01-15', expires: '2026-06-30' },
    { part: 'part_fet_600v_4a', supplier: H, code: 'HV-N6004', breaks: [[1, 0.95], [100, 0.74], [1000, 0.6], [5000, 0.54]], moq: 1, pack: 50, lead: 3, date: '2026-03-02' },
    { part: 'part_fet_800v_3a', supplier: K, code: 'KPD-700803', breaks: [[1, 0.92], [100, 0.71], [1000, 0.58]], moq: 1, pack: 50, lead: 42, date: '2026-05-11' },
    { part: 'part_fet_800v_3a', supplier: H, code: 'HV-N8003', breaks: [[1, 1.05], [100, 0.8], [500, 0.69]], moq: 1, pack: 50, lead: 3, date: '2026-03-02' },
    { part: 'part_fet_800v_6a', supplier: K, code: 'KPD-700806', breaks: [[1, 1.45], [100, 1.18], [1000, 0.97]], moq: 1, pack: 50, lead: 42, date: '2026-05-11' },
    { part: 'part_fet_800v_6a', supplier: H, code: 'HV-N8006', breaks: [[1, 1.6], [100, 1.25], [500, 1.08]], moq: 1, pack: 50, lead: 3, date: '2026-03-02' },
    { part: 'part_triac_600v_4a', supplier: K, code: 'KPD-710604', breaks: [[1, 0.52], [100, 0.39], [1000, 0.31]], moq: 1, pack: 50, lead: 28, date: '2026-05-11' },
    // ICs.
    { part: 'part_timer', supplier: K, code: 'KPD-900008', breaks: [[1, 0.32], [100, 0.22], [1000, 0.16], [5000, 0.13]], moq: 1, pack: 100, lead: 28, date: '2026-05-11' },
    { part: 'part_timer', supplier: H, code: 'HV-AST8C', breaks: [[1, 0.35], [100, 0.24], [1000, 0.175]], moq: 1, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_counter', supplier: K, code: 'KPD-900016', breaks: [[1, 0.28], [100, 0.19], [1000, 0.14]], moq: 1, pack: 50, lead: 28, date: '2026-05-11' },
    { part: 'part_mcu', supplier: K, code: 'KPD-910208', breaks: [[1, 0.55], [100, 0.42], [1000, 0.34], [5000, 0.29]], moq: 1, pack: 100, lead: 56, date: '2026-05-11' },
    { part: 'part_reg_12v', supplier: K, code: 'KPD-920012', breaks: [[1, 0.18], [100, 0.11], [2000, 0.075]], moq: 1, pack: 100, lead: 28, date: '2026-05-11' },
    { part: 'part_reg_5v', supplier: K, code: 'KPD-920005', breaks: [[1, 0.18], [100, 0.11], [2000, 0.075]], moq: 1, pack: 100, lead: 28, date: '2026-05-11' },
    { part: 'part_xfmr_230', supplier: K, code: 'KPD-950230', breaks: [[20, 3.1], [100, 2.55], [1000, 2.2]], moq: 20, pack: 20, lead: 56, date: '2026-05-11' },
    { part: 'part_xfmr_120', supplier: K, code: 'KPD-950120', breaks: [[20, 3.1], [100, 2.55], [1000, 2.2]], moq: 20, pack: 20, lead: 56, date: '2026-05-11' },
    { part: 'part_xfmr_230_15', supplier: K, code: 'KPD-950231', breaks: [[20, 3.1], [100, 2.55], [1000, 2.2]], moq: 20, pack: 20, lead: 56, date: '2026-05-11' },
    { part: 'part_xfmr_120_9', supplier: K, code: 'KPD-950121', breaks: [[20, 3.05], [100, 2.5], [1000, 2.15]], moq: 20, pack: 20, lead: 56, date: '2026-05-11' },
    // Electromechanical and protection.
    { part: 'part_button', supplier: H, code: 'HV-PB6TH', breaks: [[1, 0.09], [500, 0.05], [2000, 0.038]], moq: 1, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_button', supplier: B, code: 'BE/PB/6TH', breaks: [[50, 0.04], [1000, 0.03]], moq: 50, pack: 50, lead: 15, date: '2026-02-16' },
    { part: 'part_rotary', supplier: H, code: 'HV-RS1P6', breaks: [[1, 1.2], [100, 0.92], [500, 0.78]], moq: 1, pack: 1, lead: 35, date: '2026-03-02' },
    { part: 'part_terminal', supplier: H, code: 'HV-TB3508', breaks: [[1, 0.3], [100, 0.19], [1000, 0.14]], moq: 1, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_terminal', supplier: B, code: 'BE/TB/3-508', breaks: [[10, 0.22], [500, 0.14], [2000, 0.11]], moq: 10, pack: 10, lead: 15, date: '2026-02-16' },
    { part: 'part_fuse_1a6', supplier: H, code: 'HV-F160T', breaks: [[10, 0.11], [500, 0.07], [2500, 0.052]], moq: 10, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_fuse_1a6', supplier: B, code: 'BE/FU/160T', breaks: [[50, 0.08], [1000, 0.05]], moq: 50, pack: 50, lead: 15, date: '2026-02-16' },
    { part: 'part_fuse_3a15', supplier: H, code: 'HV-F315T', breaks: [[10, 0.11], [500, 0.07], [2500, 0.052]], moq: 10, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_fuse_2a_f', supplier: H, code: 'HV-F200F', breaks: [[10, 0.1], [500, 0.065], [2500, 0.048]], moq: 10, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_fuse_63ma', supplier: H, code: 'HV-F063T', breaks: [[10, 0.12], [500, 0.075], [2500, 0.055]], moq: 10, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_vdr_275_20', supplier: H, code: 'HV-V27520', breaks: [[10, 0.32], [1000, 0.21], [5000, 0.17]], moq: 10, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_vdr_275_20', supplier: B, code: 'BE/VDR/275-20', breaks: [[50, 0.25], [1000, 0.18]], moq: 50, pack: 50, lead: 15, date: '2026-02-16' },
    { part: 'part_vdr_275', supplier: H, code: 'HV-V27507', breaks: [[10, 0.09], [1000, 0.05], [5000, 0.038]], moq: 10, pack: 10, lead: 3, date: '2026-03-02' },
    { part: 'part_vdr_275', supplier: B, code: 'BE/VDR/275-7', breaks: [[50, 0.07], [1000, 0.04]], moq: 50, pack: 50, lead: 15, date: '2026-02-16' },
    { part: 'part_vdr_150', supplier: B, code: 'BE/VDR/150-7', breaks: [[50, 0.07], [1000, 0.04]], moq: 50, pack: 50, lead: 15, date: '2026-02-16' },
    // Thermal.
    { part: 'part_sink_20', supplier: H, code: 'HV-HS20T', breaks: [[1, 0.42], [100, 0.3], [1000, 0.22]], moq: 1, pack: 50, lead: 10, date: '2026-03-02' },
    { part: 'part_sink_8', supplier: H, code: 'HV-HS08T', breaks: [[1, 0.95], [100, 0.72], [500, 0.61]], moq: 1, pack: 25, lead: 10, date: '2026-03-02' },
    { part: 'part_pad', supplier: H, code: 'HV-TPT220', breaks: [[10, 0.05], [1000, 0.025]], moq: 10, pack: 10, lead: 3, date: '2026-03-02' },
    // Board, enclosure, hardware, packaging.
    { part: 'part_pcb_a3', supplier: 'sup_ostrel', code: 'OB-TW-A3', breaks: [[100, 0.62], [1000, 0.41], [5000, 0.33]], moq: 100, pack: 50, lead: 21, date: '2026-06-03' },
    { part: 'part_pcb_r2', supplier: 'sup_ostrel', code: 'OB-TW-R2', breaks: [[100, 0.58], [1000, 0.38], [5000, 0.31]], moq: 100, pack: 50, lead: 21, date: '2026-06-03' },
    { part: 'part_box_w', supplier: 'sup_nebrin', code: 'NP-86W', breaks: [[500, 0.92], [2000, 0.78], [10000, 0.64]], moq: 500, pack: 50, lead: 42, date: '2026-04-20' },
    { part: 'part_box_l', supplier: 'sup_nebrin', code: 'NP-86L', breaks: [[500, 1.18], [2000, 1.01], [10000, 0.86]], moq: 500, pack: 50, lead: 42, date: '2026-04-20' },
    { part: 'part_knob', supplier: 'sup_nebrin', code: 'NP-KN22W', breaks: [[500, 0.16], [5000, 0.11]], moq: 500, pack: 100, lead: 42, date: '2026-04-20' },
    { part: 'part_button_cap', supplier: 'sup_nebrin', code: 'NP-BC12W', breaks: [[500, 0.05], [5000, 0.032]], moq: 500, pack: 100, lead: 42, date: '2026-04-20' },
    { part: 'part_screw_m3', supplier: H, code: 'HV-M3X8PZ', breaks: [[100, 0.012], [1000, 0.006], [10000, 0.0035]], moq: 100, pack: 100, lead: 3, date: '2026-03-02' },
    { part: 'part_screw_wall', supplier: H, code: 'HV-M35X25', breaks: [[100, 0.018], [1000, 0.009], [10000, 0.0055]], moq: 100, pack: 100, lead: 3, date: '2026-03-02' },
    { part: 'part_carton', supplier: 'sup_yarvelle', code: 'YP-BX120-TW', breaks: [[250, 0.34], [1000, 0.24], [5000, 0.18]], moq: 250, pack: 250, lead: 28, date: '2026-06-15' },
    { part: 'part_leaflet', supplier: 'sup_yarvelle', code: 'YP-LFA5-TW', breaks: [[500, 0.06], [5000, 0.028]], moq: 500, pack: 500, lead: 21, date: '2026-06-15' },
  ];
}

function quotes(supplierList: readonly Supplier[]): Quote[] {
  const currencyOf = new Map(supplierList.map((s) => [s.id, s.currency]));
  return quoteRows().map((r) => quote(r, currencyOf));
}

function runs(): Run[] {
  return [
    { id: 'run_spring_fr4_60', rev: 1, name: 'Spring 2027 FR4-60-CD', variantId: 'variant_fr4_60_cd', quantity: 2000, dateWanted: '2027-03-15', notes: 'Best seller for the spring wholesale orders.' },
    { id: 'run_pilot_fr5_150', rev: 1, name: 'Pilot FR5-150-RT', variantId: 'variant_fr5_150_rt', quantity: 500, dateWanted: '2027-05-03', notes: 'First batch of the ceiling-fan regulator.' },
  ];
}

function pages(): NotebookPage[] {
  return [
    {
      id: 'page_notes',
      rev: 1,
      title: 'Load current',
      position: 1,
      sections: [
        {
          heading: 'Caution',
          text:
            'These circuits are live and not isolated from the mains: they can kill. The figures here are design aids, ' +
            'not a certification; follow local electrical codes and have a qualified person review every design.',
          grid: [],
        },
        {
          heading: 'Fan current at 230 V',
          text: 'Input current of a 60 W fan at full speed, before the power factor is taken into account.',
          grid: [
            ['load_w', '60'],
            ['current', '=B1/230'],
          ],
        },
      ],
    },
  ];
}

/** Customer price lists of the invented firm: a home wholesale list and an export list in US dollars. */
function priceLists(): PriceList[] {
  return [
    { id: 'pl_wholesale', rev: 1, name: 'Wholesale', currency: 'EUR', basis: 'margin', pct: 30, notes: 'Distributors and electrical wholesalers.' },
    {
      id: 'pl_export_us',
      rev: 1,
      name: 'Export (USD)',
      currency: 'USD',
      basis: 'markup',
      pct: 60,
      rounding: { step: 0.05, mode: 'up' },
      notes: 'Importers abroad; prices ex works, rounded up to 5 cents.',
    },
  ];
}

/** A fresh copy of the demo Book on every call; ids and values never change between calls. */
export function demoBook(): Book {
  const supplierList = suppliers();
  return {
    format: BOOK_FORMAT,
    version: BOOK_VERSION,
    settings: settings(),
    parts: parts(),
    suppliers: supplierList,
    quotes: quotes(supplierList),
    variants: variants(),
    buildLines: buildLines(),
    checks: [],
    runs: runs(),
    importBatches: [],
    pages: pages(),
    priceLists: priceLists(),
    orders: [],
    stockMoves: [],
  };
}

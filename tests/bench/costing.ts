// Costing figures of the benchmark, in Node: open, quote price edit, exchange-rate change against a plain loop, the
// naive one-formula-per-cell layout, and the large family's open time and heap (measured by costing-core.ts).
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';
import { measureCosting } from './costing-core.ts';
import type { BenchOptions, BenchSection, Figures } from './harness.ts';

export { engineUnitCosts, priceEdits } from './costing-core.ts';

/** A real collector for heap figures, even without node --expose-gc. */
function collector(): () => void {
  const g = (globalThis as { gc?: () => void }).gc;
  if (g) return g;
  setFlagsFromString('--expose-gc');
  return runInNewContext('gc') as () => void;
}

export const costingSection: BenchSection = {
  name: 'costing (Node)',
  async run({ quick, log }: BenchOptions): Promise<Figures> {
    const gc = collector();
    const heapMb = (): number => {
      gc();
      gc();
      return process.memoryUsage().heapUsed / 1_048_576;
    };
    return measureCosting({ quick, log, heapMb, naive: true });
  },
};

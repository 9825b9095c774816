// Planning figures of the benchmark, in Node (measured by planning-core.ts).
import type { BenchOptions, BenchSection, Figures } from './harness.ts';
import { measurePlanning } from './planning-core.ts';

export const planningSection: BenchSection = {
  name: 'planning (Node)',
  async run({ quick, log }: BenchOptions): Promise<Figures> {
    return measurePlanning({ quick, log });
  },
};

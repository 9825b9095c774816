// The benchmark's sections, run in this order. Add a section here to add its figures to `npm run bench`.
import type { BenchSection } from './harness.ts';
import { costingSection } from './costing.ts';

export const BENCH_SECTIONS: BenchSection[] = [costingSection];

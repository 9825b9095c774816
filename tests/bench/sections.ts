// The benchmark's sections, run in this order. Add a section here to add its figures to `npm run bench`.
// The browser and team sections reuse the app the bundle section built.
import type { BenchSection } from './harness.ts';
import { costingSection } from './costing.ts';
import { importSection } from './import.ts';
import { bookFileSection } from './book-file.ts';
import { checksSection } from './checks.ts';
import { bundleSection } from './bundle.ts';
import { browserSection } from './browser.ts';
import { planningSection } from './planning.ts';
import { teamSection } from './team.ts';

export const BENCH_SECTIONS: BenchSection[] = [costingSection, planningSection, checksSection, importSection, bookFileSection, bundleSection, browserSection, teamSection];

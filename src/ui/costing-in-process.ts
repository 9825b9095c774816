// The figures engines run in the page's own thread: only where there are no Web Workers (see costing-service.ts).
export { CheckTrials } from '../engine/check-trial.ts';
export { LiveFigures } from '../engine/figures.ts';
export { trialOutcomes } from '../engine/line-trial.ts';
export { WhatIfCosts } from '../engine/what-if.ts';

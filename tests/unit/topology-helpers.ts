// Which built-in checks a variant's topology does not need: those whose applies rule names another power stage,
// logic supply or selector, or a step past the variant's last. A fully checked variant shows n/a for these only.

const TOPOLOGY_IS = /(stage|supply|selector)\s*=\s*"([a-z]+)"/g;
const TOPOLOGY_IS_NOT = /(stage|supply|selector)\s*<>\s*"([a-z]+)"/g;

/** Whether a check's applies rule leaves out this variant's stage, supply or selector, or asks for more steps. */
export function foreignTopology(appliesWhen: string, params: Readonly<Record<string, unknown>>): boolean {
  const wanted = [...appliesWhen.matchAll(TOPOLOGY_IS)];
  // An OR of topologies needs one of them; otherwise each one named must match.
  const matches = wanted.map((m) => params[m[1]!] === m[2]);
  if (wanted.length > 0 && (appliesWhen.includes('OR(') ? !matches.some(Boolean) : !matches.every(Boolean))) return true;
  if ([...appliesWhen.matchAll(TOPOLOGY_IS_NOT)].some((m) => params[m[1]!] === m[2])) return true;
  const steps = /steps\s*>=\s*(\d)/.exec(appliesWhen);
  return steps !== null && Number(params['steps']) < Number(steps[1]);
}

// The short names of the class-check rules (cutoff.md). A reason carries its rule's number and
// name; everything people read shows the name first, then the number.

/** The rule names, by rule number (1-6); 0 marks a class check that could not be run. */
export const RULE_NAMES: Readonly<Record<number, string>> = {
  0: 'class-check-failed',
  1: 'peer-entries',
  2: 'mixed-silent',
  3: 'own-broadcast',
  4: 'peer-reply',
  5: 'no-aggregate',
  6: 'property-form',
}

/** A rule as people read it: its name, then its number, as in `no-aggregate (rule 5)`. */
export function ruleLabel(rule: number, name = RULE_NAMES[rule]): string {
  return `${name} (rule ${rule})`
}

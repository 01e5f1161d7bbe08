// When a sizing protects people, every verdict and report carries the caution (RULES: defer to local regulations
// and qualified review). Pure.

/** Words that mark capacity protecting people: emergency lines, beds, alarm circuits (common practice, no source). */
const safetyWords = /\b(emergency|112|911|999|ambulance|fire|rescue|police|alarm|beds?|ward|intensive care|icu|hospital|triage|lifeline)\b/i;

export function sizesSafetyCapacity(...texts: (string | null | undefined)[]): boolean {
  return texts.some((t) => !!t && safetyWords.test(t));
}

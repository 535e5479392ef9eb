/**
 * Answer scales whose order a reader knows without being told: rating
 * anchors of agreement, frequency, satisfaction, quality, likelihood,
 * importance and amount. The anchors follow Vagias (2006), "Likert-type
 * scale response anchors" (Clemson University), with the usual variants of
 * survey practice (common practice); each scale runs from low to high.
 * A column whose labels all belong to one scale looks ordered; the profile
 * says so and lists the levels in the scale's order.
 */
export const ORDERED_SCALES: readonly (readonly string[])[] = [
  ['strongly disagree', 'disagree', 'somewhat disagree', 'slightly disagree', 'neither agree nor disagree', 'neither disagree nor agree', 'neutral', 'undecided', 'slightly agree', 'somewhat agree', 'agree', 'strongly agree'],
  ['never', 'almost never', 'very rarely', 'rarely', 'seldom', 'occasionally', 'sometimes', 'often', 'frequently', 'very frequently', 'usually', 'almost always', 'always'],
  ['never', 'rarely', 'less than once a year', 'once a year', 'yearly', 'a few times a year', 'every few months', 'monthly', 'a few times a month', 'weekly', 'a few times a week', 'daily', 'several times a day'],
  ['very dissatisfied', 'dissatisfied', 'somewhat dissatisfied', 'slightly dissatisfied', 'neither satisfied nor dissatisfied', 'neither dissatisfied nor satisfied', 'neutral', 'slightly satisfied', 'somewhat satisfied', 'satisfied', 'very satisfied', 'completely satisfied'],
  ['very poor', 'poor', 'below average', 'fair', 'average', 'good', 'above average', 'very good', 'excellent'],
  ['very unlikely', 'extremely unlikely', 'unlikely', 'somewhat unlikely', 'neither likely nor unlikely', 'neutral', 'somewhat likely', 'likely', 'very likely', 'extremely likely'],
  ['not at all important', 'not important', 'low importance', 'slightly important', 'somewhat important', 'moderately important', 'neutral', 'important', 'very important', 'extremely important'],
  ['none', 'very low', 'low', 'below average', 'medium', 'moderate', 'average', 'above average', 'high', 'very high'],
  ['not at all', 'a little', 'slightly', 'somewhat', 'moderately', 'quite a bit', 'very much', 'a lot', 'extremely', 'completely'],
];

/**
 * The levels in the order of the one scale that holds all of them (case and
 * surrounding spaces ignored), or null when no scale does, or when fewer
 * than three levels would be ordered (two levels carry no order to speak of).
 */
export function scaleOrder(levels: readonly string[]): string[] | null {
  if (levels.length < 3) return null;
  const folded = levels.map((l) => l.trim().toLowerCase());
  for (const scale of ORDERED_SCALES) {
    if (!folded.every((l) => scale.includes(l))) continue;
    return levels.map((l, k) => ({ l, at: scale.indexOf(folded[k]) })).sort((a, b) => a.at - b.at).map((x) => x.l);
  }
  return null;
}

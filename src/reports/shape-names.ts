/**
 * The changepoint shapes in words, beside their codes, for people who do not
 * read "3PH" at a glance. The codes are ASHRAE Guideline 14's; the words are
 * plain descriptions of our own.
 */
const SHAPE_WORDS: Record<string, string> = {
  '1P': 'one-parameter (mean use, no weather dependence)',
  '2P': 'two-parameter (straight line)',
  '3PC': 'three-parameter cooling',
  '3PH': 'three-parameter heating',
  '4P': 'four-parameter (two slopes meeting at one changepoint)',
  '5P': 'five-parameter (heating slope, flat band, cooling slope)',
};

/** "three-parameter heating (3PH)"; an unknown code stays as it is. */
export function shapeName(code: string): string {
  const words = SHAPE_WORDS[code];
  return words === undefined ? code : `${words} (${code})`;
}

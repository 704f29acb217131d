/**
 * Work the analysis does whose amount a hostile file chooses, counted (never timed): the fuzz
 * suite holds it within a stated multiple of the input's size, on any machine however busy.
 * Counts only go up; a reader takes the difference over one analysis.
 */
export const WORK = {
  /** Edit distances computed for did-you-means (spec/suggest.ts). */
  distances: 0,
  /** Characters parsed again to check did-you-mean fixes (spec/suggestion-fixes.ts): a mirror's
   *  lines for a local re-read, the whole text otherwise. */
  rereadChars: 0,
};

/** The caution every picker screen carries (README.md, Safety). */
export const CAUTION_SHORT = "Routes are walking suggestions. Follow the site's pedestrian walkways, forklift traffic rules and lifting limits.";

export const CAUTION_FULL: readonly string[] = [
  'The route on this tablet is a walking suggestion, not an instruction.',
  "Follow the site's pedestrian walkways, forklift traffic rules and lifting limits.",
  'Local occupational-safety rules and site procedures take precedence over the suggested route.',
];

/** The caution on a printed pick list: the same rules, said of the sheet rather than the tablet. */
export const CAUTION_PRINT: readonly string[] = ['The route on this sheet is a walking suggestion, not an instruction.', CAUTION_FULL[1]!, CAUTION_FULL[2]!];

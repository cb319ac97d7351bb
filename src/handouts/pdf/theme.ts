/**
 * The look of phosledger's printed pages ("ledger teal"): dark text on white, one teal brand
 * colour, amber for targets, red only for cautions. Every text colour keeps at least 7:1
 * contrast against its background (WCAG AAA) so a handout stays readable on a fridge door.
 */
export const THEME = {
  ink: '#1B1F24',
  muted: '#3A434D',
  brand: '#0B5563',
  brandLight: '#CFE6E9',
  brandPale: '#F0F6F7',
  onBrand: '#FFFFFF',
  target: '#8A4300',
  caution: '#8E1616',
  cautionPale: '#FCEFEF',
  rule: '#9FB3B8',
} as const;

/** Type sizes in points; nothing a patient reads is under 12 pt. */
export const TYPE = {
  title: 22,
  heading: 18,
  subheading: 15,
  body: 13,
  small: 12,
} as const;

export const PAPER_POINTS = {
  a4: { width: 595.28, height: 841.89 },
  letter: { width: 612, height: 792 },
} as const;

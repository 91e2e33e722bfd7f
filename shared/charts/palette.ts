/**
 * Ordinate's colours, defined once. The app theme (src/theme.ts) and every chart
 * (browser and server exports) read them from here, so a plot in a calc package
 * matches the screen it came from.
 *
 * The look is "ink on drafting paper": one deep slate ink for structure and the
 * first curve, one warm ochre reserved for targets and warnings.
 */
export const palette = {
  /** Deep slate ink: primary actions, the first record curve. */
  ink: '#22405a',
  inkHover: '#2f5677',
  inkPressed: '#182f43',
  inkSoft: '#e3e9ef',
  inkTint: '#eef2f5',
  /** The navigation rail: text, rules and the current-page mark on the ink background. */
  railText: '#b9c6d3',
  railRule: '#3a5874',
  railMark: '#d9914f',
  /** Warm ochre: design targets and warnings. */
  ochre: '#b5602a',
  ochreHover: '#c8733b',
  ochrePressed: '#944c1f',
  ochreSoft: '#f6e8dc',
  /** Errors and "returned" reviews. */
  brick: '#9d3431',
  brickHover: '#b04541',
  brickPressed: '#7f2826',
  brickSoft: '#fbefee',
  /** Error text and borders on forms. */
  brickBright: '#a33a2b',
  /** Success and "checked" reviews. */
  moss: '#466b47',
  mossHover: '#567f57',
  mossPressed: '#375538',
  mossSoft: '#eef3ee',
  /** Paper and rules. */
  paper: '#f6f5f1',
  surface: '#ffffff',
  rule: '#d8d5cc',
  ruleStrong: '#a9a59a',
  text: '#1b2128',
  textMuted: '#57606b',
  /** Chart frame: grid lines and axis text. */
  gridMajor: '#d4d1c8',
  gridMinor: '#ebe9e3',
} as const

/**
 * Curves after the first record cycle through these, chosen to stay apart in
 * greyscale print as well as in colour.
 */
export const seriesColours = [palette.ink, '#5d7f38', '#7a4c86', '#2b7f83', '#8a6a2c', '#4b5560'] as const

/**
 * The comparison chart's record curves: one teal family, dark and light in turn so that
 * neighbours stay apart, all clear of the ink mean, the ochre target and the brick shortfall.
 */
export const recordHues = ['#1f6466', '#5fa3a5', '#2b7f83', '#86bcbd', '#17504f', '#44908f'] as const

export type PaletteColour = (typeof palette)[keyof typeof palette]

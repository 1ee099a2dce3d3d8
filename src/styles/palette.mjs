// The Coatrail palette, one copy: a calm slate-and-paper base (ISA-101 style: grey for normal),
// with colour reserved for abnormal states. Names are ours. tailwind.config.mjs builds its
// colour names from it; islands that draw on a canvas or in SVG (charts, bars, sparklines)
// import it, so a Tailwind class and a chart line never disagree.

export const PALETTE = {
  paper: '#f4f3ef',
  ink: '#1f2529',
  inkSoft: '#4a545b',
  inkFaint: '#7b858c',
  slateLine: '#c9cdcf',
  slatePanel: '#e8e8e3',
  slateDeep: '#2d3a42',
  lacquer: '#2f6f73',
  lacquerDark: '#1f4e51',
  lacquerLight: '#d7e8e6',
  // abnormal states only
  alertHigh: '#b3261e',
  alertMed: '#c26a00',
  alertLow: '#8a6d00',
  alertBg: '#fbe9e7',
  ok: '#3c6e47',
};

/** Alarm priorities: the colour of each (always beside a shape and a word, never alone). */
export const PRIORITY_COLOUR = { high: PALETTE.alertHigh, medium: PALETTE.alertMed, low: PALETTE.alertLow };

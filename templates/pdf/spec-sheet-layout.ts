// The spec sheet's layout: page geometry, colours and the words that head each part.
// The renderer (server/pdf/spec-sheet.ts) draws what this describes.
export const SPEC_SHEET_LAYOUT = {
  margin: 36,
  colours: {
    band: '#1e2a26',
    bandText: '#ffffff',
    accent: '#a34a22',
    amber: '#e3a53a',
    ink: '#1c1b19',
    soft: '#4a4740',
    rule: '#c9d6cf',
    fill: '#e3ebe6',
    bandFill: '#efc7ad',
    good: '#2d6a3e',
    alarm: '#a3212b',
  },
  sizes: { title: 18, heading: 11, body: 9, small: 7.5, serial: 15 },
  headings: {
    identity: 'This unit',
    option: 'Clipping option and fitted devices',
    profile: 'Harmonic profile of this unit',
    qa: 'Bench test',
    power: 'Power and care',
  },
  /** Drive settings the harmonic table shows: label and rotation (the reference comes from the model). */
  tableDrives: [
    { label: 'Low drive', drive: 0.2 },
    { label: 'Reference', drive: null },
    { label: 'High drive', drive: 0.9 },
  ],
  harmonicsInTable: 8,
  harmonicsInThd: 10,
  cautions: [
    'Power from a regulated DC supply of the stated voltage, centre-negative barrel plug. Wrong polarity or voltage can damage the unit.',
    'Do not open the enclosure while it is powered. Amplifiers it connects to carry lethal voltages inside: their repair is for qualified people only.',
    'Repairs involve soldering (hot iron, flux fumes, possibly leaded solder): ventilate, wash hands, and follow local rules and licensed practice.',
  ],
} as const;

// Demo pedal models of Hollowmere Effects (invented names), their revisions, BOMs, build steps and options.
import { SOLDERING_CAUTION } from '../../../../shared/catalog/cautions';

/** One BOM line: part number, space-separated designators (quantity = their count) or a bare quantity. */
export type DemoBomLine = [partNumber: string, designatorsOrQty: string | number, notes?: string];

interface BoardValues {
  pcb: string;
  opamp: string;
  gainGround: string; // R6: sets the stage's minimum gain with R7
  feedback: string; // R7
  drivePot: string;
  tonePot: string;
  enclosure: string;
  extraLines?: DemoBomLine[];
}

// A drive pedal's board: input buffer, one gain stage, clipper slot, tone, output, power filtering.
function driveBoard(v: BoardValues): DemoBomLine[] {
  return [
    ['R-1M-MF', 'R1', 'input pull-down, kills switch pop'],
    ['R-10K-MF', 'R2'],
    ['R-1M-MF', 'R3', 'buffer bias'],
    ['R-10K-MF', 'R4', 'bias divider'],
    ['R-10K-MF', 'R5', 'bias divider'],
    [`R-${v.gainGround}-MF`, 'R6', 'gain leg to ground'],
    [`R-${v.feedback}-MF`, 'R7', 'feedback resistor'],
    ['R-1K-MF', 'R8'],
    ['R-10K-MF', 'R9'],
    ['R-22K-MF', 'R10', 'tone network'],
    ['R-1K-MF', 'R11'],
    ['R-10K-MF', 'R12'],
    ['R-100K-MF', 'R13', 'output pull-down'],
    ['R-100R-MF', 'R14', 'output isolation'],
    ['R-4K7-MF', 'R15', 'status LED current'],
    ['R-2K2-MF', 'R16', 'clipper series resistor'],
    ['R-470R-MF', 'R17'],
    ['R-47K-MF', 'R18'],
    ['R-3K3-MF', 'R19'],
    ['R-6K8-MF', 'R20'],
    ['R-220K-MF', 'R21'],
    ['R-68K-MF', 'R22'],
    ['R-10R-MF', 'R23', 'supply filter'],
    ['C-100N-FILM', 'C1', 'input coupling'],
    ['C-100P-CER', 'C2', 'RF filter'],
    ['C-1U-FILM', 'C3'],
    ['C-47N-FILM', 'C4', 'gain leg low cut'],
    ['C-47P-CER', 'C5', 'feedback high cut'],
    ['C-10N-FILM', 'C6'],
    ['C-22N-FILM', 'C7', 'tone'],
    ['C-4N7-FILM', 'C8', 'tone'],
    ['C-1U-FILM', 'C9', 'output coupling'],
    ['C-220N-FILM', 'C10'],
    ['C-1N-FILM', 'C11'],
    ['C-47U-EL', 'C12', 'Vref bypass'],
    ['C-100U-EL', 'C13', 'supply reservoir'],
    ['C-10U-EL', 'C14'],
    [v.opamp, 'IC1'],
    ['IC-SOCKET-8', 'IC1S', 'socket for IC1'],
    ['Q-2N5088', 'Q1', 'input buffer'],
    ['D-1N5817', 'D1', 'reverse-polarity guard'],
    ['LED-RED-5', 'LED1', 'status LED'],
    [v.drivePot, 'VR1', 'drive'],
    [v.tonePot, 'VR2', 'tone'],
    ['POT-B10K-16', 'VR3', 'level'],
    ['J-MONO-635', 'J1 J2', 'input, output'],
    ['J-DC-21', 'J3'],
    ['SW-3PDT', 'SW1'],
    [v.pcb, 'PCB1'],
    [v.enclosure, 'ENC1'],
    ['HW-KNOB-SK', 3, 'drive, tone, level'],
    ['HW-BEZEL-5', 1],
    ['HW-FEET', 1],
    ['HW-STANDOFF', 2],
    ['HW-BAT-CLIP', 1],
    ['W-HOOKUP-24', 12, 'off-board wiring, 10 cm pieces'],
    ['PK-BOX-122', 1],
    ...(v.extraLines ?? []),
  ];
}

export interface DemoStep {
  title: string;
  minutes: number;
  skill: 'through-hole' | 'smd-rework' | 'device-matching' | 'enclosure' | 'final-check';
  soldering: boolean;
  instructions: string;
  safety_note?: string;
}

function steps(extra: DemoStep[] = []): DemoStep[] {
  const s: DemoStep[] = [
    { title: 'Populate resistors and the guard diode', minutes: 18, skill: 'through-hole', soldering: true, instructions: 'Fit R1–R23 by value from the kit tray, bodies flat, then D1 with its band to the square pad. Trim leads to 1 mm.' },
    { title: 'Populate capacitors, socket and buffer transistor', minutes: 15, skill: 'through-hole', soldering: true, instructions: 'Film and ceramic caps first, then the socket, Q1 (flat face to the silk outline), electrolytics last with the stripe to the minus pad.' },
    { title: 'Match the clipping devices', minutes: 12, skill: 'device-matching', soldering: false, instructions: 'Measure Vf of each clipping device at the bench test current; pair positive and negative strings within 10 mV and record the readings on the unit.' },
    { title: 'Fit the clipping devices', minutes: 6, skill: 'through-hole', soldering: true, instructions: 'Fit the matched devices of the ordered option in the clipper slot, orientation per the silk screen. Note which string is positive.' },
    { title: 'Mount the enclosure hardware', minutes: 10, skill: 'enclosure', soldering: false, instructions: 'Jacks, DC jack, footswitch and LED bezel into the pre-drilled, coated enclosure. Hand-tight plus a quarter turn; protect the finish with a cloth.' },
    { title: 'Wire the jacks, footswitch and power', minutes: 20, skill: 'through-hole', soldering: true, instructions: 'Off-board wiring in the shop colours: red 9 V, black ground, yellow signal. Sleeve every footswitch lug.' },
    { title: 'Board into the enclosure, pots and knobs', minutes: 8, skill: 'enclosure', soldering: false, instructions: 'Seat the board on its standoffs, tighten the pot nuts, fit the knobs at full anticlockwise on the index mark.' },
    { title: 'Clean flux and inspect every joint', minutes: 7, skill: 'smd-rework', soldering: true, instructions: 'Clean with isopropyl alcohol; inspect under the magnifier and reflow any dull or cracked joint.' },
    { title: 'Final check before the test bench', minutes: 6, skill: 'final-check', soldering: false, instructions: 'From a current-limited 9 V bench supply: current draw within the sheet value, LED and bypass work, no noise when the switch is stamped.', safety_note: 'Use the current-limited low-voltage supply only; amplifier and mains work is done at the test bench by qualified people.' },
    ...extra,
  ];
  return s.map((st) => (st.soldering ? { ...st, safety_note: SOLDERING_CAUTION } : st));
}

export interface DemoOption {
  code: string;
  name: string;
  description: string;
  topology: 'shunt' | 'feedback';
  network: Record<string, number>;
  positive: string[]; // engine preset ids, in series
  negative: string[];
  surcharge: number;
  published: boolean;
}

export interface DemoRevision {
  label: string;
  notes: string;
  drive: { drive_min_gain: number; drive_max_gain: number; drive_taper: 'audio' | 'linear'; input_peak_v: number; supply_v: number; reference_drive: number };
  bom: DemoBomLine[];
  steps: DemoStep[];
  frozen: boolean;
}

export interface DemoModel {
  name: string;
  sku: string;
  description: string;
  base_price_cents: number;
  published: boolean;
  revisions: [DemoRevision, DemoRevision];
  options: DemoOption[];
}

const SHUNT = { seriesOhms: 2200 };
const FEEDBACK = { feedbackOhms: 100000, groundOhms: 4700 };

export const DEMO_MODELS: DemoModel[] = [
  {
    name: 'Saltmarsh Drive', sku: 'HM-SMD',
    description: 'A low-gain overdrive that keeps the pick attack: one op-amp stage into a hard clipper, warm tone control.',
    base_price_cents: 18900, published: true,
    revisions: [
      { label: 'First run', notes: 'Original board; tone cap 22 nF.', frozen: true,
        drive: { drive_min_gain: 1, drive_max_gain: 120, drive_taper: 'audio', input_peak_v: 0.1, supply_v: 9, reference_drive: 0.5 },
        bom: driveBoard({ pcb: 'PCB-SMD-1', opamp: 'IC-4558', gainGround: '4K7', feedback: '470K', drivePot: 'POT-A500K-16', tonePot: 'POT-B25K-16', enclosure: 'ENC-122X66' }), steps: steps() },
      { label: 'Quieter board', notes: 'New ground plane, JFET-input op-amp, level trim.', frozen: false,
        drive: { drive_min_gain: 1, drive_max_gain: 150, drive_taper: 'audio', input_peak_v: 0.1, supply_v: 9, reference_drive: 0.5 },
        bom: driveBoard({ pcb: 'PCB-SMD-2', opamp: 'IC-TL072', gainGround: '4K7', feedback: '470K', drivePot: 'POT-A500K-16', tonePot: 'POT-B25K-16', enclosure: 'ENC-122X66', extraLines: [['TRIM-B100K', 'VR4', 'output level trim, set at final check']] }), steps: steps() },
    ],
    options: [
      { code: 'SI2', name: 'Silicon pair', description: 'Two small-signal silicon diodes, one each way: tight and even, odd harmonics first.', topology: 'shunt', network: SHUNT, positive: ['si-small-signal'], negative: ['si-small-signal'], surcharge: 0, published: true },
      { code: 'LED2', name: 'Red LED pair', description: 'Two red LEDs: more headroom and a louder, more open clip.', topology: 'shunt', network: SHUNT, positive: ['led-red'], negative: ['led-red'], surcharge: 900, published: true },
      { code: 'ASYM', name: 'Silicon against LED', description: 'Silicon one way, a red LED the other: the uneven clip adds even harmonics for a fuller, tube-like edge.', topology: 'shunt', network: SHUNT, positive: ['si-small-signal'], negative: ['led-red'], surcharge: 900, published: true },
      { code: 'GE2', name: 'Germanium pair', description: 'Matched germanium diodes: the earliest, softest knee of the range.', topology: 'shunt', network: { seriesOhms: 2200, shuntFarads: 10e-9 }, positive: ['germanium-point-contact'], negative: ['germanium-point-contact'], surcharge: 2400, published: false },
    ],
  },
  {
    name: 'Lanternfly Overdrive', sku: 'HM-LFO',
    description: 'Diodes in the feedback loop for a soft, amp-like break-up; 18 V supply for headroom.',
    base_price_cents: 21500, published: true,
    revisions: [
      { label: 'Nine-volt board', notes: 'Ran from 9 V only.', frozen: true,
        drive: { drive_min_gain: 1, drive_max_gain: 40, drive_taper: 'audio', input_peak_v: 0.15, supply_v: 9, reference_drive: 0.5 },
        bom: driveBoard({ pcb: 'PCB-LFO-1', opamp: 'IC-4558', gainGround: '4K7', feedback: '100K', drivePot: 'POT-A100K-16', tonePot: 'POT-B10K-16', enclosure: 'ENC-122X66' }), steps: steps() },
      { label: 'Eighteen-volt board', notes: 'On-board voltage doubler removed; accepts 9–18 V, specified at 18 V.', frozen: false,
        drive: { drive_min_gain: 1, drive_max_gain: 50, drive_taper: 'audio', input_peak_v: 0.15, supply_v: 18, reference_drive: 0.5 },
        bom: driveBoard({ pcb: 'PCB-LFO-2', opamp: 'IC-TL072', gainGround: '4K7', feedback: '100K', drivePot: 'POT-A100K-16', tonePot: 'POT-B10K-16', enclosure: 'ENC-122X66', extraLines: [['Q-BS170', 'Q2', 'relay bypass driver'], ['SW-SPDT-MINI', 'SW2', 'bright switch']] }), steps: steps() },
    ],
    options: [
      { code: 'SI2', name: 'Silicon pair', description: 'Silicon diodes across the feedback resistor: smooth, mid-forward break-up.', topology: 'feedback', network: FEEDBACK, positive: ['si-small-signal'], negative: ['si-small-signal'], surcharge: 0, published: true },
      { code: 'SI3A', name: 'Two against one silicon', description: 'Two silicon diodes in series one way, one the other: an uneven clip with a strong second harmonic.', topology: 'feedback', network: FEEDBACK, positive: ['si-small-signal', 'si-small-signal'], negative: ['si-small-signal'], surcharge: 600, published: true },
      { code: 'SK2', name: 'Schottky pair, rounded', description: 'Low-knee Schottky diodes with a 47 pF cap across the loop to round off the top end.', topology: 'feedback', network: { ...FEEDBACK, feedbackFarads: 47e-12 }, positive: ['schottky-small-signal'], negative: ['schottky-small-signal'], surcharge: 600, published: true },
      // Not stocked yet: the white LED has no linked part, so the catalog flags this option.
      { code: 'WHT2', name: 'White LED pair', description: 'White LEDs in the loop: the loudest, cleanest break-up of the range.', topology: 'feedback', network: FEEDBACK, positive: ['led-white'], negative: ['led-white'], surcharge: 900, published: false },
    ],
  },
  {
    name: 'Cinderpath Distortion', sku: 'HM-CPD',
    description: 'High-gain distortion with a hard clipper and a wide drive range; five clipping choices.',
    base_price_cents: 19900, published: true,
    revisions: [
      { label: 'Prototype run', notes: 'Rectifier clipper only.', frozen: true,
        drive: { drive_min_gain: 5, drive_max_gain: 400, drive_taper: 'audio', input_peak_v: 0.1, supply_v: 9, reference_drive: 0.5 },
        bom: driveBoard({ pcb: 'PCB-CPD-1', opamp: 'IC-4558', gainGround: '1K', feedback: '470K', drivePot: 'POT-A500K-16', tonePot: 'POT-B25K-16', enclosure: 'ENC-119X94' }), steps: steps() },
      { label: 'Wider drive', notes: 'Second gain stage trimmed in; 78L05 for the status logic.', frozen: false,
        drive: { drive_min_gain: 5, drive_max_gain: 500, drive_taper: 'audio', input_peak_v: 0.1, supply_v: 9, reference_drive: 0.5 },
        bom: driveBoard({ pcb: 'PCB-CPD-2', opamp: 'IC-TL072', gainGround: '1K', feedback: '470K', drivePot: 'POT-A500K-16', tonePot: 'POT-B25K-16', enclosure: 'ENC-119X94', extraLines: [['IC-78L05', 'U2'], ['Q-J201', 'Q3', 'mute switch'], ['C-10U-EL', 'C15', 'regulator output']] }), steps: steps() },
    ],
    options: [
      { code: 'RECT2', name: 'Rectifier pair', description: 'Silicon rectifiers: the hardest, most compressed clip.', topology: 'shunt', network: SHUNT, positive: ['si-rectifier'], negative: ['si-rectifier'], surcharge: 0, published: true },
      { code: 'SI4', name: 'Stacked silicon', description: 'Two silicon diodes in series each way: twice the headroom of a single pair, still symmetric.', topology: 'shunt', network: SHUNT, positive: ['si-small-signal', 'si-small-signal'], negative: ['si-small-signal', 'si-small-signal'], surcharge: 300, published: true },
      { code: 'BLU2', name: 'Blue LED pair', description: 'Blue LEDs clip late: loud, wide open, almost clean at low drive.', topology: 'shunt', network: SHUNT, positive: ['led-blue'], negative: ['led-blue'], surcharge: 900, published: true },
      { code: 'ASYM', name: 'Silicon against yellow LED', description: 'Uneven clip for a rougher, even-harmonic-rich edge.', topology: 'shunt', network: SHUNT, positive: ['si-small-signal'], negative: ['led-yellow'], surcharge: 900, published: true },
      { code: 'GE2', name: 'Germanium pair', description: 'Germanium diodes: the earliest, softest knee.', topology: 'shunt', network: SHUNT, positive: ['germanium-point-contact'], negative: ['germanium-point-contact'], surcharge: 2400, published: true },
    ],
  },
];

/** Which stocked part each engine preset's device is bought as. */
export const PRESET_PARTS: Record<string, string> = {
  'si-small-signal': 'D-1N4148',
  'si-rectifier': 'D-1N4001',
  'schottky-small-signal': 'D-BAT41',
  'germanium-point-contact': 'D-GE-PC',
  'led-red': 'LED-RED-5',
  'led-yellow': 'LED-YEL-5',
  'led-green': 'LED-GRN-5',
  'led-blue': 'LED-BLU-5',
  // led-white is left unlinked on purpose: options using it are flagged.
};

/**
 * Which demo BOM lines ask the assembler for the part's lot: ICs (not their sockets), diodes, and parts that are stocked
 * as clipping devices (e.g. the status LED, a red LED like the LED2 option's) — the lots an owner
 * traces after a bad batch. Everything else (resistors, caps, hardware) is not lot-traced.
 */
export function demoLineNeedsLot(partNumber: string, category: string): boolean {
  return (category === 'ic' && !partNumber.startsWith('IC-SOCKET')) || category === 'diode' || Object.values(PRESET_PARTS).includes(partNumber);
}


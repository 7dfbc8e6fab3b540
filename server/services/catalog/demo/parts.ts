// Demo scenario for Hollowmere Effects (invented): suppliers, parts and how their stock arrived.
// Manufacturer part numbers are generic industry designations, not any one maker's catalogue.

export const DEMO_SUPPLIERS = [
  { name: 'Brackwater Components', email: 'orders@brackwater.example', website: 'https://brackwater.example', default_lead_time_days: 5 },
  { name: 'Tinmoss Electronics', email: 'sales@tinmoss.example', website: 'https://tinmoss.example', default_lead_time_days: 9 },
  { name: 'Orrin & Pell Supply', email: 'desk@orrinpell.example', website: 'https://orrinpell.example', default_lead_time_days: 14 },
  { name: 'Fernlow Metalworks', email: 'hello@fernlow.example', website: 'https://fernlow.example', default_lead_time_days: 21 },
] as const;

type Supplier = (typeof DEMO_SUPPLIERS)[number]['name'];

export interface DemoPart {
  part_number: string;
  category: string;
  value: string;
  package: string;
  manufacturer_part_number: string;
  supplier: Supplier;
  unit_cost_cents: number;
  reorder_point: number;
  bin_location: string;
  /** Stock received in the demo history (first delivery, then an optional second). */
  received: [number, number?];
  /** Consumed by earlier builds (kept below received). */
  consumed: number;
}

const B: Supplier = 'Brackwater Components';
const T: Supplier = 'Tinmoss Electronics';
const O: Supplier = 'Orrin & Pell Supply';
const F: Supplier = 'Fernlow Metalworks';

// '4k7' → '4.7 kΩ', '10R' → '10 Ω', '1M' → '1 MΩ': the value as printed on the label.
function printed(code: string) {
  const m = /^(\d+)([RkM])(\d*)$/.exec(code)!;
  const unit = { R: 'Ω', k: 'kΩ', M: 'MΩ' }[m[2] as 'R' | 'k' | 'M'];
  return `${m[1]}${m[3] ? `.${m[3]}` : ''} ${unit}`;
}

function resistor(value: string, bin: string, consumed = 40): DemoPart {
  return {
    part_number: `R-${value.toUpperCase()}-MF`, category: 'resistor', value: `${printed(value)} 1 % 0.25 W metal film`, package: 'axial 0207',
    manufacturer_part_number: `MF0207-${value.toUpperCase()}-1%`, supplier: B, unit_cost_cents: 3, reorder_point: 100,
    bin_location: bin, received: [200, 100], consumed,
  };
}

function cap(pn: string, value: string, pkg: string, cost: number, bin: string, reorder = 50): DemoPart {
  return {
    part_number: pn, category: 'capacitor', value, package: pkg, manufacturer_part_number: `${pn.slice(2)}-GEN`,
    supplier: pkg.startsWith('radial') ? T : B, unit_cost_cents: cost, reorder_point: reorder, bin_location: bin,
    received: [150], consumed: 30,
  };
}

const other = (p: Omit<DemoPart, 'consumed' | 'received'> & Partial<Pick<DemoPart, 'consumed' | 'received'>>): DemoPart =>
  ({ received: [50], consumed: 10, ...p });

export const DEMO_PARTS: DemoPart[] = [
  ...['1k', '2k2', '4k7', '6k8', '10k', '22k', '33k', '47k', '100k', '220k', '470k', '1M', '10R', '100R', '470R', '51k'].map((v, i) =>
    resistor(v, `A${String(i + 1).padStart(2, '0')}`)),
  // Two resistor values run low on purpose: the parts list shows them below their reorder point.
  { ...resistor('3k3', 'A17'), received: [100], consumed: 70 },
  { ...resistor('68k', 'A18'), received: [100], consumed: 85 },
  cap('C-100P-CER', '100 pF C0G 50 V', 'radial 2.5 mm ceramic', 4, 'B01'),
  cap('C-47P-CER', '47 pF C0G 50 V', 'radial 2.5 mm ceramic', 4, 'B02'),
  cap('C-1N-FILM', '1 nF film 63 V', 'box 5 mm', 12, 'B03'),
  cap('C-4N7-FILM', '4.7 nF film 63 V', 'box 5 mm', 12, 'B04'),
  cap('C-10N-FILM', '10 nF film 63 V', 'box 5 mm', 14, 'B05'),
  cap('C-22N-FILM', '22 nF film 63 V', 'box 5 mm', 14, 'B06'),
  cap('C-47N-FILM', '47 nF film 63 V', 'box 5 mm', 16, 'B07'),
  cap('C-100N-FILM', '100 nF film 63 V', 'box 5 mm', 18, 'B08'),
  cap('C-220N-FILM', '220 nF film 63 V', 'box 5 mm', 22, 'B09'),
  cap('C-1U-FILM', '1 µF film 63 V', 'box 5 mm', 35, 'B10'),
  cap('C-10U-EL', '10 µF electrolytic 25 V', 'radial 5 mm', 9, 'B11'),
  cap('C-47U-EL', '47 µF electrolytic 25 V', 'radial 5 mm', 11, 'B12'),
  { ...cap('C-100U-EL', '100 µF electrolytic 25 V', 'radial 5 mm', 14, 'B13', 40), received: [60], consumed: 35 },
  other({ part_number: 'IC-TL072', category: 'ic', value: 'dual op-amp, JFET input', package: 'DIP-8', manufacturer_part_number: 'TL072', supplier: T, unit_cost_cents: 38, reorder_point: 20, bin_location: 'C01', received: [60, 40], consumed: 45 }),
  other({ part_number: 'IC-4558', category: 'ic', value: 'dual op-amp, bipolar', package: 'DIP-8', manufacturer_part_number: '4558', supplier: T, unit_cost_cents: 42, reorder_point: 20, bin_location: 'C02', received: [40], consumed: 28 }),
  other({ part_number: 'IC-SOCKET-8', category: 'ic', value: 'DIP-8 socket, turned pin', package: 'DIP-8', manufacturer_part_number: 'SKT-DIP8-TP', supplier: B, unit_cost_cents: 25, reorder_point: 30, bin_location: 'C03', received: [100], consumed: 40 }),
  other({ part_number: 'IC-78L05', category: 'ic', value: '5 V regulator 100 mA', package: 'TO-92', manufacturer_part_number: '78L05', supplier: T, unit_cost_cents: 21, reorder_point: 15, bin_location: 'C04', received: [40], consumed: 12 }),
  other({ part_number: 'Q-2N5088', category: 'transistor', value: 'NPN small-signal, high gain', package: 'TO-92', manufacturer_part_number: '2N5088', supplier: T, unit_cost_cents: 15, reorder_point: 30, bin_location: 'C05', received: [80], consumed: 30 }),
  other({ part_number: 'Q-J201', category: 'transistor', value: 'N-channel JFET', package: 'TO-92', manufacturer_part_number: 'J201', supplier: O, unit_cost_cents: 48, reorder_point: 20, bin_location: 'C06', received: [30], consumed: 14 }),
  other({ part_number: 'Q-BS170', category: 'transistor', value: 'N-channel MOSFET (true bypass relay driver)', package: 'TO-92', manufacturer_part_number: 'BS170', supplier: T, unit_cost_cents: 19, reorder_point: 20, bin_location: 'C07', received: [50], consumed: 20 }),
  other({ part_number: 'D-1N4148', category: 'diode', value: 'silicon small-signal diode', package: 'DO-35', manufacturer_part_number: '1N4148', supplier: B, unit_cost_cents: 2, reorder_point: 100, bin_location: 'D01', received: [300, 200], consumed: 120 }),
  other({ part_number: 'D-1N4001', category: 'diode', value: 'silicon rectifier 1 A 50 V', package: 'DO-41', manufacturer_part_number: '1N4001', supplier: B, unit_cost_cents: 3, reorder_point: 60, bin_location: 'D02', received: [200], consumed: 80 }),
  other({ part_number: 'D-1N5817', category: 'diode', value: 'Schottky 1 A 20 V (reverse-polarity guard)', package: 'DO-41', manufacturer_part_number: '1N5817', supplier: B, unit_cost_cents: 6, reorder_point: 40, bin_location: 'D03', received: [100], consumed: 35 }),
  other({ part_number: 'D-BAT41', category: 'diode', value: 'Schottky small-signal', package: 'DO-35', manufacturer_part_number: 'BAT41', supplier: T, unit_cost_cents: 9, reorder_point: 40, bin_location: 'D04', received: [60], consumed: 12 }),
  // Germanium stock is scarce and slow to come: below its reorder point on purpose.
  other({ part_number: 'D-GE-PC', category: 'diode', value: 'germanium point-contact diode (matched stock)', package: 'DO-7 glass', manufacturer_part_number: '1N34A', supplier: O, unit_cost_cents: 65, reorder_point: 40, bin_location: 'D05', received: [40], consumed: 26 }),
  other({ part_number: 'LED-RED-5', category: 'led', value: 'red 5 mm diffused', package: 'T-1¾', manufacturer_part_number: 'LED5-RD-DIF', supplier: B, unit_cost_cents: 5, reorder_point: 80, bin_location: 'D06', received: [300], consumed: 110 }),
  other({ part_number: 'LED-YEL-5', category: 'led', value: 'yellow 5 mm diffused', package: 'T-1¾', manufacturer_part_number: 'LED5-YL-DIF', supplier: B, unit_cost_cents: 5, reorder_point: 40, bin_location: 'D07', received: [100], consumed: 20 }),
  other({ part_number: 'LED-GRN-5', category: 'led', value: 'green 5 mm diffused (GaP)', package: 'T-1¾', manufacturer_part_number: 'LED5-GN-DIF', supplier: B, unit_cost_cents: 5, reorder_point: 40, bin_location: 'D08', received: [100], consumed: 16 }),
  other({ part_number: 'LED-BLU-5', category: 'led', value: 'blue 5 mm diffused', package: 'T-1¾', manufacturer_part_number: 'LED5-BL-DIF', supplier: B, unit_cost_cents: 7, reorder_point: 40, bin_location: 'D09', received: [150], consumed: 60 }),
  other({ part_number: 'LED-WHT-5', category: 'led', value: 'white 5 mm clear', package: 'T-1¾', manufacturer_part_number: 'LED5-WH-CLR', supplier: B, unit_cost_cents: 8, reorder_point: 30, bin_location: 'D10', received: [60], consumed: 8 }),
  other({ part_number: 'POT-A100K-16', category: 'pot', value: '100 kΩ audio (A) 16 mm', package: 'PCB mount', manufacturer_part_number: 'P16-A100K', supplier: O, unit_cost_cents: 95, reorder_point: 20, bin_location: 'E01', received: [60], consumed: 28 }),
  other({ part_number: 'POT-A500K-16', category: 'pot', value: '500 kΩ audio (A) 16 mm', package: 'PCB mount', manufacturer_part_number: 'P16-A500K', supplier: O, unit_cost_cents: 95, reorder_point: 20, bin_location: 'E02', received: [40], consumed: 18 }),
  other({ part_number: 'POT-B10K-16', category: 'pot', value: '10 kΩ linear (B) 16 mm', package: 'PCB mount', manufacturer_part_number: 'P16-B10K', supplier: O, unit_cost_cents: 90, reorder_point: 20, bin_location: 'E03', received: [60], consumed: 30 }),
  other({ part_number: 'POT-B25K-16', category: 'pot', value: '25 kΩ linear (B) 16 mm', package: 'PCB mount', manufacturer_part_number: 'P16-B25K', supplier: O, unit_cost_cents: 90, reorder_point: 20, bin_location: 'E04', received: [40], consumed: 15 }),
  other({ part_number: 'TRIM-B100K', category: 'pot', value: '100 kΩ trimmer', package: '6 mm top adjust', manufacturer_part_number: 'TR6-100K', supplier: B, unit_cost_cents: 18, reorder_point: 20, bin_location: 'E05', received: [50], consumed: 12 }),
  other({ part_number: 'J-MONO-635', category: 'jack', value: '6.35 mm mono, enclosed', package: 'panel mount', manufacturer_part_number: 'JK635-M-ENC', supplier: O, unit_cost_cents: 70, reorder_point: 40, bin_location: 'F01', received: [120], consumed: 56 }),
  other({ part_number: 'J-DC-21', category: 'jack', value: '2.1 mm DC, centre negative', package: 'panel mount', manufacturer_part_number: 'DCJ-21-PNL', supplier: O, unit_cost_cents: 55, reorder_point: 20, bin_location: 'F02', received: [60], consumed: 28 }),
  other({ part_number: 'SW-3PDT', category: 'switch', value: '3PDT latching footswitch', package: 'panel mount', manufacturer_part_number: 'FS-3PDT-L', supplier: O, unit_cost_cents: 240, reorder_point: 15, bin_location: 'F03', received: [40], consumed: 28 }),
  other({ part_number: 'SW-SPDT-MINI', category: 'switch', value: 'SPDT mini toggle (on-on)', package: 'panel mount', manufacturer_part_number: 'TG-SPDT-M', supplier: O, unit_cost_cents: 130, reorder_point: 15, bin_location: 'F04', received: [30], consumed: 9 }),
  other({ part_number: 'ENC-122X66', category: 'enclosure', value: 'die-cast aluminium 122 × 66 × 39 mm, powder coat', package: '122 × 66 × 39 mm', manufacturer_part_number: 'DC-122-66-39', supplier: F, unit_cost_cents: 890, reorder_point: 10, bin_location: 'G01', received: [30], consumed: 14 }),
  other({ part_number: 'ENC-119X94', category: 'enclosure', value: 'die-cast aluminium 119 × 94 × 34 mm, powder coat', package: '119 × 94 × 34 mm', manufacturer_part_number: 'DC-119-94-34', supplier: F, unit_cost_cents: 1120, reorder_point: 8, bin_location: 'G02', received: [12], consumed: 5 }),
  other({ part_number: 'PCB-SMD-2', category: 'pcb', value: 'Saltmarsh Drive board, rev 2', package: '2-layer 1.6 mm', manufacturer_part_number: 'HM-SMD-B2', supplier: T, unit_cost_cents: 410, reorder_point: 10, bin_location: 'H01', received: [25], consumed: 8 }),
  other({ part_number: 'PCB-SMD-1', category: 'pcb', value: 'Saltmarsh Drive board, rev 1', package: '2-layer 1.6 mm', manufacturer_part_number: 'HM-SMD-B1', supplier: T, unit_cost_cents: 380, reorder_point: 0, bin_location: 'H02', received: [20], consumed: 18 }),
  other({ part_number: 'PCB-LFO-2', category: 'pcb', value: 'Lanternfly Overdrive board, rev 2', package: '2-layer 1.6 mm', manufacturer_part_number: 'HM-LFO-B2', supplier: T, unit_cost_cents: 430, reorder_point: 10, bin_location: 'H03', received: [25], consumed: 6 }),
  other({ part_number: 'PCB-LFO-1', category: 'pcb', value: 'Lanternfly Overdrive board, rev 1', package: '2-layer 1.6 mm', manufacturer_part_number: 'HM-LFO-B1', supplier: T, unit_cost_cents: 400, reorder_point: 0, bin_location: 'H04', received: [15], consumed: 12 }),
  other({ part_number: 'PCB-CPD-2', category: 'pcb', value: 'Cinderpath Distortion board, rev 2', package: '2-layer 1.6 mm', manufacturer_part_number: 'HM-CPD-B2', supplier: T, unit_cost_cents: 450, reorder_point: 10, bin_location: 'H05', received: [20], consumed: 4 }),
  other({ part_number: 'PCB-CPD-1', category: 'pcb', value: 'Cinderpath Distortion board, rev 1', package: '2-layer 1.6 mm', manufacturer_part_number: 'HM-CPD-B1', supplier: T, unit_cost_cents: 420, reorder_point: 0, bin_location: 'H06', received: [10], consumed: 9 }),
  other({ part_number: 'HW-KNOB-SK', category: 'knob', value: 'skirted knob, cream, 6 mm D shaft', package: '', manufacturer_part_number: 'KB-SK-CRM', supplier: F, unit_cost_cents: 60, reorder_point: 40, bin_location: 'J01', received: [150], consumed: 70 }),
  other({ part_number: 'HW-BEZEL-5', category: 'hardware', value: 'LED bezel 5 mm, chrome', package: '', manufacturer_part_number: 'BZ5-CHR', supplier: F, unit_cost_cents: 22, reorder_point: 30, bin_location: 'J02', received: [80], consumed: 28 }),
  other({ part_number: 'HW-BAT-CLIP', category: 'hardware', value: '9 V battery snap with leads', package: '', manufacturer_part_number: 'BS-9V-150', supplier: B, unit_cost_cents: 14, reorder_point: 30, bin_location: 'J03', received: [60], consumed: 20 }),
  other({ part_number: 'HW-FEET', category: 'hardware', value: 'rubber feet, set of 4', package: '', manufacturer_part_number: 'RF-12-4', supplier: F, unit_cost_cents: 30, reorder_point: 30, bin_location: 'J04', received: [60], consumed: 28 }),
  other({ part_number: 'HW-STANDOFF', category: 'hardware', value: 'PCB standoff M3 × 10 mm', package: '', manufacturer_part_number: 'SO-M3-10', supplier: F, unit_cost_cents: 8, reorder_point: 50, bin_location: 'J05', received: [200], consumed: 60 }),
  other({ part_number: 'W-HOOKUP-24', category: 'wire', value: 'hook-up wire 24 AWG, per 10 cm', package: '', manufacturer_part_number: 'HW24-STR', supplier: B, unit_cost_cents: 2, reorder_point: 200, bin_location: 'J06', received: [1000], consumed: 300 }),
  other({ part_number: 'PK-BOX-122', category: 'packaging', value: 'printed carton for 122 × 66 mm pedals', package: '', manufacturer_part_number: 'CT-122-66', supplier: F, unit_cost_cents: 85, reorder_point: 20, bin_location: 'K01', received: [50], consumed: 18 }),
];

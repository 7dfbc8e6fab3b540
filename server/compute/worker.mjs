// Entry of each compute-pool worker thread. The app's sources are TypeScript run by tsx, and a
// worker thread starts as plain Node, so it registers tsx's loader first, then loads the tasks.
import { register } from 'tsx/esm/api';

register();
const tasks = await import('./tasks.ts');

export const { contractProfile, sheetBand, specSheetProfile, specSheetPdf, packingSlipPdf, invoicePdf, addressLabelPdf, serialLabelsPdf, zipEntries, wavCapture, unitPrediction, batchMatching, designSearch } = tasks;

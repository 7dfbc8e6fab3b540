export { SpecSheetLink } from './SpecSheetLink';
export { BatchSpecSheets } from './BatchSpecSheets';
export { RegenerateSheetButton } from './RegenerateSheetButton';
export { OrderSpecSheets } from './OrderSpecSheets';

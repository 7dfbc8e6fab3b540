// Serial numbers: shop prefix, the batch number (from a database sequence, never reused) and the
// unit's place in the batch (1..N, gap-free), e.g. HM-B0007-012. The check letter catches a
// mistyped digit when a serial is read off a label.

const CHECK_LETTERS = 'ACDEFHJKLMNPRTUVWXY';

/** A check letter over the digits, weighted by position, e.g. serialCheck('0007012'). */
export function serialCheck(digits: string): string {
  let sum = 0;
  for (let i = 0; i < digits.length; i++) sum += (i + 1) * Number(digits[i]);
  return CHECK_LETTERS[sum % CHECK_LETTERS.length];
}

/** e.g. unitSerial('HM', 7, 12) = 'HM-B0007-012K' style: prefix, batch, sequence and check letter. */
export function unitSerial(prefix: string, batchNumber: number, sequence: number): string {
  const batch = String(batchNumber).padStart(4, '0');
  const seq = String(sequence).padStart(3, '0');
  return `${prefix}-B${batch}-${seq}${serialCheck(batch + seq)}`;
}

export const batchLabel = (batchNumber: number) => `B${String(batchNumber).padStart(4, '0')}`;

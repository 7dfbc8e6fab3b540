// Rules of the bench tablet that the server enforces and the client explains, in one place.
import { calendarDay } from '../format';

/**
 * A step finished in under `percent` % (the shop's `fast_step_percent` setting) of its standard minutes is "far faster" than usual and asks
 * the assembler to confirm (a mis-tap, or a step skipped). E.g. 2 min against a standard of 10 min
 * at 25 % is fast; 3 min is not.
 */
export function isFastStep(actualMinutes: number, standardMinutes: number, percent: number) {
  return standardMinutes > 0 && actualMinutes < (standardMinutes * percent) / 100;
}

/** Why a build counts as late on a given day (YYYY-MM-DD, the shop's calendar), or null when it is not. */
export function lateReason(build: { plannedDate: string | null; dueDate: string | null }, today: string): string | null {
  if (build.dueDate && build.dueDate < today) return `order was due ${build.dueDate}`;
  if (build.plannedDate && build.plannedDate < today) return `planned for ${build.plannedDate}`;
  return null;
}

/** A moment as a calendar day (YYYY-MM-DD) in the shop's time zone. */
export function shopDate(moment: Date | string, timeZone: string) {
  return calendarDay(moment, timeZone);
}

// Proposed build plan: builds are taken in order of due date (earliest first; stock builds with
// none last) and, within a due date, longest first; each goes to the qualified assembler (all the
// build's skills) who would finish it soonest. A build stays within one working day when it fits
// the day's remaining capacity, else it moves to the next working day. Pure: the planner's screen
// recomputes the load from edits with it.

/** How the plan is made, in the shop's words: shown wherever a plan is explained. */
export const PLAN_EXPLAINED =
  'Builds for the earliest due date come first, and the longest builds first within a day; each goes to the assembler with the skills for it who is free soonest, within their daily minutes. Stock builds come last.';

export interface PlanJob {
  unitId: number;
  minutes: number;
  skills: readonly string[];
  /** Due date (YYYY-MM-DD) of the order the unit is for; null for stock builds. */
  dueDate: string | null;
}

export interface PlanAssembler {
  id: number;
  name: string;
  skills: readonly string[];
  dailyCapacityMinutes: number;
}

export interface PlannedBuild {
  unitId: number;
  assemblerId: number;
  date: string;
}

export interface DayLoad {
  assemblerId: number;
  date: string;
  minutes: number;
  capacityMinutes: number;
  overloaded: boolean;
}

export interface PlanResult {
  builds: PlannedBuild[];
  /** Units nobody has every skill for. */
  unassignable: number[];
  load: DayLoad[];
  /** Units planned after their order's due date. */
  late: number[];
}

const DAY_MS = 86_400_000;

/** The next working day (Monday–Friday) on or after a date, e.g. workingDayOnOrAfter('2026-12-05') = '2026-12-07'. */
export function workingDayOnOrAfter(date: string): string {
  let t = Date.parse(`${date}T00:00:00Z`);
  while ([0, 6].includes(new Date(t).getUTCDay())) t += DAY_MS;
  return new Date(t).toISOString().slice(0, 10);
}

/** The n-th working day after a start (n = 0 is the start itself), e.g. addWorkingDays('2026-12-04', 1) = '2026-12-07'. */
export function addWorkingDays(start: string, n: number): string {
  let date = workingDayOnOrAfter(start);
  for (let i = 0; i < n; i++) date = workingDayOnOrAfter(new Date(Date.parse(`${date}T00:00:00Z`) + DAY_MS).toISOString().slice(0, 10));
  return date;
}

export const canBuild = (a: PlanAssembler, job: PlanJob) => job.skills.every((s) => a.skills.includes(s));

/** Proposes who builds each unit on which working day, e.g. proposePlan(jobs, people, '2026-12-07').builds.length = jobs.length. */
export function proposePlan(jobs: readonly PlanJob[], assemblers: readonly PlanAssembler[], startDate: string): PlanResult {
  const order = [...jobs].sort((a, b) => {
    if (a.dueDate !== b.dueDate) return a.dueDate === null ? 1 : b.dueDate === null ? -1 : a.dueDate < b.dueDate ? -1 : 1;
    return b.minutes - a.minutes || a.unitId - b.unitId;
  });
  const cursor = new Map(assemblers.map((a) => [a.id, { day: 0, used: 0 }]));
  const builds: PlannedBuild[] = [];
  const unassignable: number[] = [];
  for (const job of order) {
    let best: { a: PlanAssembler; day: number; used: number; finish: number } | null = null;
    for (const a of assemblers) {
      if (!canBuild(a, job) || a.dailyCapacityMinutes <= 0) continue;
      const c = cursor.get(a.id)!;
      const fits = c.used + job.minutes <= a.dailyCapacityMinutes || c.used === 0;
      const day = fits ? c.day : c.day + 1;
      const used = (fits ? c.used : 0) + job.minutes;
      const finish = day + used / a.dailyCapacityMinutes; // in working days from the start
      if (!best || finish < best.finish - 1e-9) best = { a, day, used, finish };
    }
    if (!best) {
      unassignable.push(job.unitId);
      continue;
    }
    cursor.set(best.a.id, { day: best.day, used: best.used });
    builds.push({ unitId: job.unitId, assemblerId: best.a.id, date: addWorkingDays(startDate, best.day) });
  }
  return { builds, unassignable, ...assessPlan(builds, jobs, assemblers) };
}

/** Load per assembler per day, overloaded days and late units for any plan (proposed or edited by hand). */
export function assessPlan(builds: readonly PlannedBuild[], jobs: readonly PlanJob[], assemblers: readonly PlanAssembler[]) {
  const jobById = new Map(jobs.map((j) => [j.unitId, j]));
  const capacity = new Map(assemblers.map((a) => [a.id, a.dailyCapacityMinutes]));
  const cells = new Map<string, DayLoad>();
  const late: number[] = [];
  for (const b of builds) {
    const job = jobById.get(b.unitId);
    if (!job) continue;
    const key = `${b.assemblerId}|${b.date}`;
    const cell = cells.get(key) ?? { assemblerId: b.assemblerId, date: b.date, minutes: 0, capacityMinutes: capacity.get(b.assemblerId) ?? 0, overloaded: false };
    cell.minutes += job.minutes;
    cell.overloaded = cell.minutes > cell.capacityMinutes;
    cells.set(key, cell);
    if (job.dueDate && b.date > job.dueDate) late.push(b.unitId);
  }
  const load = [...cells.values()].sort((x, y) => x.assemblerId - y.assemblerId || (x.date < y.date ? -1 : 1));
  return { load, late };
}

// Former home of the clock, input checking and verdict order, now in clock.ts, issues.ts and
// checks/spec.ts; kept so older imports (the CLI's Clock) still resolve.
export { addMonthsIso, daysBetween, fixedClock, systemClock, type Clock } from './clock';
export { frequencyOrIssue, Issues, parseWith } from './issues';
export { specOf, worstVerdict } from './checks/spec';

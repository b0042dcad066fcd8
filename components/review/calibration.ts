/** How far an estimate rests on the machine's own recorded runs, in the words the screens show. */
export function calibrationNote(c: { runs: number; calibrated: boolean } | null | undefined): string {
  if (!c) return 'Not calibrated: no recorded runs on this machine yet.';
  const runs = `${c.runs} run${c.runs === 1 ? '' : 's'}`;
  if (c.calibrated) return `Calibrated from ${runs}.`;
  return c.runs === 0 ? 'Not calibrated: no recorded runs on this machine yet.' : `Not calibrated yet: ${runs} recorded, more are needed.`;
}

/** Round axis steps and ticks, shared by the charts (pure, tested without a renderer). */

/** A round step (1, 2 or 5 times a power of ten) giving about `count` ticks up to `max`. */
export function niceStep(max: number, count = 4): number {
  if (!(max > 0)) return 1;
  const raw = max / count;
  const pow = 10 ** Math.floor(Math.log10(raw));
  const m = raw / pow;
  return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * pow;
}

/** Ticks 0, step, 2·step ... up to and including the first one at or above `max`. */
export function ticksTo(max: number, count = 4): number[] {
  const step = niceStep(max, count);
  const top = Math.ceil(max / step - 1e-9) * step;
  const out: number[] = [];
  for (let i = 0; i * step <= top + step * 1e-9; i++) out.push(Number((i * step).toPrecision(12)));
  return out;
}

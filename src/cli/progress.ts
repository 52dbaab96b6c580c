/**
 * Progress lines on stderr (stdout carries results only, so output pipes cleanly).
 * On a terminal the line is rewritten in place; elsewhere one line per update, throttled.
 */
export class Progress {
  private last = 0;
  private readonly started = performance.now();
  private readonly tty = Boolean(process.stderr.isTTY);
  private readonly minIntervalMs: number;
  constructor(
    private readonly label: string,
    private readonly quiet = false,
    minIntervalMs = 1000,
  ) {
    this.minIntervalMs = testIntervalMs() ?? minIntervalMs;
  }

  update(text: string, force = false): void {
    if (this.quiet) return;
    const now = Date.now();
    if (!force && now - this.last < (this.tty ? 100 : this.minIntervalMs)) return;
    this.last = now;
    if (this.tty) process.stderr.write(`\r\x1b[K${this.label}: ${text}`);
    else process.stderr.write(`${this.label}: ${text}\n`);
  }

  /**
   * One unit of work of a run whose size is known (or, with `estimated`, expected): the count,
   * what it reached (loss, residual, χN), the rate since the run started and the time left for
   * the whole run. An estimated total is shown with "~" and grows when the work runs past it.
   */
  step(done: number, total: number, detail: string, unit = 'steps', estimated = false): void {
    const seconds = (performance.now() - this.started) / 1000;
    const rate = seconds > 0 ? done / seconds : Number.NaN;
    const size = estimated ? Math.max(total, done + 1) : total;
    const left = rate > 0 ? (size - done) / rate : Number.NaN;
    const tilde = estimated ? '~' : '';
    this.update(`${unit} ${done}/${tilde}${size}${detail ? ` | ${detail}` : ''} | ${formatRate(rate)} ${unit}/s | ${tilde}${formatDuration(left)} left`);
  }

  done(text: string): void {
    if (this.quiet) return;
    if (this.tty) process.stderr.write(`\r\x1b[K${this.label}: ${text}\n`);
    else process.stderr.write(`${this.label}: ${text}\n`);
  }
}

/**
 * A test hook, not a user setting: MESOFIELD_TEST_PROGRESS_MS sets the throttle of the lines
 * written to a pipe (0: every update). The signal tests send a signal when a given step's line
 * appears; with the one-second throttle a short run could end between two lines, so those
 * tests had to run far longer than the stop they check.
 */
function testIntervalMs(): number | undefined {
  const text = process.env.MESOFIELD_TEST_PROGRESS_MS;
  if (text === undefined || !/^\d+$/.test(text)) return undefined;
  return Number(text);
}

/** One phase of a run, in the order the run goes through them: its size in units (steps, iterations, evaluations). */
export interface PlannedPhase {
  name: string;
  units: number;
  unit: string;
  /** The size is an expectation (a search whose length the data decide), not a count. */
  estimated?: boolean;
}

/**
 * Progress over a run of several phases (warm start, Adam, L-BFGS, …), with the time left for
 * the whole run: the current phase's remaining units at its measured rate, plus each later
 * phase at its own rate when measured, or at the current one's when it counts the same unit
 * (Adam steps after warm-start steps). A later phase in another unit, not yet measured, is
 * named beside the time ("then 1500 iterations (L-BFGS) not yet timed"): a rate borrowed
 * across units would be a number without meaning. Borrowed rates and expected sizes make the
 * time left an estimate, shown with "~".
 */
export class RunProgress {
  private readonly secondsPerUnit = new Map<string, number>();
  private current?: { name: string; firstAt: number; firstDone: number };

  constructor(
    private readonly progress: Progress,
    private readonly phases: PlannedPhase[],
  ) {
    // The first phase's clock starts now: its first report already carries a rate.
    const first = phases.find((p) => p.units > 0);
    if (first) this.begin(first.name);
  }

  /** Phase `name` starts now (its clock runs from here, not from its first report), `from` units already done (a resumed run). */
  begin(name: string, from = 0): void {
    this.current = { name, firstAt: performance.now(), firstDone: from };
  }

  /** A phase's size once the run knows it (a count the caller could not know in advance). */
  size(name: string, units: number): void {
    const p = this.phases.find((q) => q.name === name);
    if (p) p.units = units;
  }

  /** `done` units of phase `name` finished; `detail` is what it reached (loss, residual, χN). */
  at(name: string, done: number, detail: string, force = false): void {
    const now = performance.now();
    // A phase's rate is measured from its start (begin) or else from its first report on:
    // what ran before (set-up, a resumed run's earlier steps) does not count against it.
    if (this.current?.name !== name) this.current = { name, firstAt: now, firstDone: done };
    const i = this.phases.findIndex((p) => p.name === name);
    const phase = i >= 0 ? this.phases[i] : { name, units: done, unit: 'steps' };
    const spu = done > this.current.firstDone ? (now - this.current.firstAt) / 1000 / (done - this.current.firstDone) : Number.NaN;
    if (Number.isFinite(spu)) this.secondsPerUnit.set(name, spu);
    const size = phase.estimated ? Math.max(phase.units, done + 1) : phase.units;
    let left = Math.max(0, size - done) * spu;
    let guessed = Boolean(phase.estimated);
    const untimed: string[] = [];
    let later = 0;
    for (const next of i >= 0 ? this.phases.slice(i + 1) : []) {
      if (next.units <= 0) continue;
      later++;
      const known = this.secondsPerUnit.get(next.name);
      if (next.estimated) guessed = true;
      if (known !== undefined) left += next.units * known;
      // A later phase in the same unit (Adam steps after warm-start steps) borrows this rate;
      // one in another unit (L-BFGS iterations, refits) is named, not guessed at.
      else if (next.unit === phase.unit) {
        left += next.units * spu;
        guessed = true;
      } else untimed.push(`${next.estimated ? '~' : ''}${next.units} ${next.unit} (${next.name})`);
    }
    const tilde = guessed ? '~' : '';
    const rest = untimed.length ? `, then ${untimed.join(' and ')} not yet timed` : later > 0 ? ' (whole run)' : '';
    // A phase's first report, before anything of it has finished, has no rate yet.
    const timing = Number.isFinite(left) ? `${formatRate(1 / spu)} ${phase.unit}/s | ${tilde}${formatDuration(left)} left${rest}` : 'rate and time left: measuring';
    this.progress.update(`${name} ${done}/${phase.estimated ? '~' : ''}${size} ${phase.unit}${detail ? ` | ${detail}` : ''} | ${timing}`, force);
  }
}

export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds)) return '?';
  if (seconds < 60) return `${seconds.toFixed(1)} s`;
  const m = Math.floor(seconds / 60);
  return `${m} min ${Math.round(seconds - 60 * m)} s`;
}

export function formatRate(rate: number): string {
  if (!Number.isFinite(rate)) return '?';
  return rate >= 10 ? rate.toFixed(0) : rate >= 1 ? rate.toFixed(1) : rate.toPrecision(2);
}
